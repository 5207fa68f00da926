import { gunzipSync, gzipSync } from 'node:zlib';
import type { RegisterField } from './columns';
import type { DetectedHeader, SavedMappings } from './headers';
import { readRegisterSheets } from './parse';
import { readCsv, readXlsx, type SheetStream } from './reader';
import {
  type EstateSnapshot,
  type ImportPlan,
  type ImportSummary,
  type NewSchool,
  type PlanInProgress,
  type RoomWrite,
  startPlan,
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
  const parts: string[] = [planHead(plan)];
  for (const w of plan.roomWrites) parts.push(stagedRoomLine(w));
  return ownedBuffer([gzipSync(parts.join(''), { level: 1 })]);
}

/** The first line of an encoded plan: everything but the room writes, as JSON. */
function planHead(plan: ImportPlan): string {
  const { problems: _problems, roomWrites: _writes, roomChanges: _changes, rejectedRows: _rejected, ...rest } = plan;
  return `${JSON.stringify(rest satisfies StoredPlan)}\n`;
}

/** `parts` joined in a buffer that is the whole of its own memory, so it can be handed to another thread. */
export function ownedBuffer(parts: Uint8Array[]): Buffer<ArrayBuffer> {
  const bytes = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    bytes.set(p, at);
    at += p.length;
  }
  return Buffer.from(bytes.buffer);
}

/** Room writes per gzip member of an early encoding. */
const LINES_PER_MEMBER = 5000;

/**
 * encodePlan done as the rows arrive: each room write is encoded as soon as its row is worked out, and every
 * LINES_PER_MEMBER lines are compressed as one gzip member. A gzip file may hold several members, read back as one text
 * (decodePlan), so the plan's head is compressed last and put first. A row can still be refused once every row is
 * known (a repeated code, a school's heating): its write then drops out of the plan, and the plan is encoded afresh.
 */
class EarlyEncoding {
  private lines: string[] = [];
  private readonly members: Buffer[] = [];
  private count = 0;

  add(write: RoomWrite): void {
    this.lines.push(stagedRoomLine(write));
    this.count++;
    if (this.lines.length >= LINES_PER_MEMBER) this.compress();
  }

  private compress(): void {
    if (this.lines.length === 0) return;
    this.members.push(gzipSync(this.lines.join(''), { level: 1 }));
    this.lines = [];
  }

  /**
   * The plan encoded. The plan's writes are some of those added, in the order added, so the same count means the same
   * writes.
   */
  encode(plan: ImportPlan): Buffer {
    if (plan.roomWrites.length !== this.count) return encodePlan(plan);
    this.compress();
    return ownedBuffer([gzipSync(planHead(plan), { level: 1 }), ...this.members]);
  }
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
export function analyseUpload(
  bytes: Buffer,
  kind: 'xlsx' | 'csv',
  saved: SavedMappings,
  options: ImportOptions,
  snapshot: EstateSnapshot,
  mark: (step: string) => void = () => {},
): Promise<UploadAnalysis> {
  return analyseSheets(kind === 'xlsx' ? readXlsx(bytes) : readCsv(bytes), saved, options, snapshot, mark);
}

/**
 * analyseUpload over sheets as they are read. Each data row is checked and compared with the estate, and its room write
 * encoded, as soon as it is read (startPlan), so that this work overlaps the reading when the sheets are read in another
 * thread (parse-worker.ts).
 */
export async function analyseSheets(
  sheets: AsyncIterable<SheetStream>,
  saved: SavedMappings,
  options: ImportOptions,
  snapshot: EstateSnapshot,
  mark: (step: string) => void = () => {},
): Promise<UploadAnalysis> {
  let plan: PlanInProgress | undefined;
  const early = new EarlyEncoding();
  const file = await readRegisterSheets(sheets, saved, options, (header) => {
    const started = startPlan(header.columns, snapshot, {
      clearBlanks: options.clearBlanks === true,
      schoolChoices: options.schools,
      onRoomWrite: (write) => early.add(write),
    });
    plan = started;
    return (row) => started.add(row);
  });
  mark('read and check cells');
  if (!plan) throw new Error('The register was read without its rows being planned');
  const finished = plan.finish(file.read);
  plan = undefined;
  mark('compare with the estate');
  const rowsGz = early.encode(finished);
  const width = file.header.columns.length;
  const rejectedRowsGz =
    finished.rejectedRows.length > 0
      ? encodeRejectedRows({
          sheetName: file.sheetName,
          header: file.header.columns.map((c) => c.header),
          rows: finished.rejectedRows.map((r) => ({ ...r, cells: r.cells.slice(0, width) })),
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
    summary: finished.summary,
    problems: finished.problems.slice(0, MAX_PROBLEMS_KEPT),
    problemCount: finished.problems.length,
    missingRooms: finished.missingRooms,
    roomChanges: finished.roomChanges,
    rowsGz,
    newSchools: finished.newSchools,
    rejectedRowsGz,
    mappedPairs: options.mapping
      ? file.header.columns
          .filter((c) => c.field && c.letter in (options.mapping ?? {}))
          .map((c) => ({ headerKey: c.headerKey, field: c.field as RegisterField }))
      : [],
  };
}
