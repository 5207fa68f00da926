import { gunzipSync, gzipSync } from 'node:zlib';
import type { RegisterField } from './columns';
import type { DetectedHeader, SavedMappings } from './headers';
import { readRegisterFile } from './parse';
import {
  type EstateSnapshot,
  type ImportPlan,
  type ImportSummary,
  type NewSchool,
  planImport,
  type RejectedRow,
  type RoomChange,
} from './plan';
import { stagedRoomLine, type StoredPlan } from './staging';
import type { ImportOptions } from './register.schemas';
import type { ImportProblem } from './rows';

/** Problems kept and returned per import; the counts in the summary stay exact beyond it. */
export const MAX_PROBLEMS_KEPT = 10_000;

/** An upload read, checked and compared with the estate: everything its preview stores and answers. */
export interface UploadAnalysis {
  sheetName: string;
  header: { row: number; rowCount: number; confident: boolean; columns: DetectedHeader['columns'] };
  topRows: string[][];
  summary: ImportSummary;
  /** The first MAX_PROBLEMS_KEPT problems. */
  problems: ImportProblem[];
  problemCount: number;
  missingRooms: ImportPlan['missingRooms'];
  /** Per room, the fields that change from what to what (at most MAX_ROOM_CHANGES_LISTED rooms). */
  roomChanges: RoomChange[];
  /** The plan as the commit needs it (encodePlan). */
  rowsGz: Buffer;
  /** The schools the file creates, each listed once. */
  newSchools: NewSchool[];
  /** The rejected rows as the file held them, with the file's header (encodeRejectedRows); null when none. */
  rejectedRowsGz: Buffer | null;
  /** Header → field pairs of the columns the person mapped by hand, to remember for the trust. */
  mappedPairs: { headerKey: string; field: RegisterField }[];
}

/**
 * The plan as the commit needs it, gzip-compressed: one line of JSON with everything but the room
 * writes, then the room writes as COPY text lines, ready to stream into the commit's staging table.
 */
export function encodePlan(plan: ImportPlan): Buffer {
  const { problems: _problems, roomWrites, roomChanges: _changes, rejectedRows: _rejected, ...rest } = plan;
  const parts: string[] = [JSON.stringify(rest satisfies StoredPlan), '\n'];
  for (const w of roomWrites) parts.push(stagedRoomLine(w));
  return gzipSync(parts.join(''), { level: 1 });
}

/** The inverse of encodePlan: the plan without its room writes, and the room writes as COPY text. */
export function decodePlan(gz: Buffer): { plan: StoredPlan; roomLines: Buffer } {
  const bytes = gunzipSync(gz);
  const end = bytes.indexOf(10);
  return { plan: JSON.parse(bytes.toString('utf8', 0, end)) as StoredPlan, roomLines: bytes.subarray(end + 1) };
}

/** The rejected rows of an import, ready for the rejected-rows workbook: the file's header over them. */
export interface RejectedRows {
  sheetName: string;
  /** The header text of each column of the file, from column A. */
  header: string[];
  rows: RejectedRow[];
}

/** The rejected rows as stored with the import (gzip'd JSON). */
export const encodeRejectedRows = (rejected: RejectedRows) => gzipSync(JSON.stringify(rejected), { level: 1 });
/** The inverse of encodeRejectedRows. */
export const decodeRejectedRows = (gz: Buffer) => JSON.parse(gunzipSync(gz).toString('utf8')) as RejectedRows;

/**
 * Reads an .xlsx or .csv upload, checks every cell and compares it with the estate (no database):
 * all the CPU work of a preview, so it can run off the request thread (parse-in-worker.ts).
 */
export async function analyseUpload(
  bytes: Buffer,
  kind: 'xlsx' | 'csv',
  saved: SavedMappings,
  options: ImportOptions,
  snapshot: EstateSnapshot,
  mark: (step: string) => void = () => {},
): Promise<UploadAnalysis> {
  const file = await readRegisterFile(bytes, kind, saved, options);
  mark('read and check cells');
  const plan = planImport(file.read, file.header.columns, snapshot, {
    clearBlanks: options.clearBlanks === true,
    schoolChoices: options.schools,
  });
  // The read rows are not needed past here; letting them go keeps peak memory down on big files.
  file.read.rows = [];
  mark('compare with the estate');
  const rowsGz = encodePlan(plan);
  const width = file.header.columns.length;
  const rejectedRowsGz =
    plan.rejectedRows.length > 0
      ? encodeRejectedRows({
          sheetName: file.sheetName,
          header: file.header.columns.map((c) => c.header),
          rows: plan.rejectedRows.map((r) => ({ ...r, cells: r.cells.slice(0, width) })),
        })
      : null;
  mark('encode the plan');
  return {
    sheetName: file.sheetName,
    header: {
      row: file.header.row,
      rowCount: file.header.rowCount,
      confident: file.header.confident,
      columns: file.header.columns,
    },
    topRows: file.topRows,
    summary: plan.summary,
    problems: plan.problems.slice(0, MAX_PROBLEMS_KEPT),
    problemCount: plan.problems.length,
    missingRooms: plan.missingRooms,
    roomChanges: plan.roomChanges,
    rowsGz,
    newSchools: plan.newSchools,
    rejectedRowsGz,
    mappedPairs: options.mapping
      ? file.header.columns
          .filter((c) => c.field && c.letter in (options.mapping ?? {}))
          .map((c) => ({ headerKey: c.headerKey, field: c.field as RegisterField }))
      : [],
  };
}
