import { sql, type Kysely } from 'kysely';
import type pg from 'pg';
import { config } from '../config';
import { withConnection } from '../db/client';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { assertWithinPlan } from '../billing/plan-limits';
import { schoolCountNotice, type QuantityChangePreview } from '../billing/price-change';
import { badRequest, conflict, notFound } from '../http/errors';
import { analyseUploadIsolated } from './parse-in-worker';
import { decodePlan, decodeRejectedRows, type RejectedRows, type UploadAnalysis } from './analyse';
import { estateSnapshot, type ImportPlan, type ImportSummary, type NewSchool } from './plan';
import { MAX_FILE_BYTES } from './reader';
import type { CommitBody, ImportOptions } from './register.schemas';
import { estateFingerprint, loadEstateRecords } from '../estate/estate.repository';
import { applyPlan } from './apply';
import { loadSavedMappings, saveMappings } from './register.repository';
import type { ImportProblem } from './rows';
import { fileTooLarge, noRejectedRows } from './register.errors';

type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** Logs how long each step took to stderr when AIRTALLY_IMPORT_TIMINGS is set (the benchmark sets it). */
function stepTimer(name: string): (step: string) => void {
  if (!config().importTimings) return () => {};
  let last = performance.now();
  return (step) => {
    const now = performance.now();
    console.error(`[${name}] ${step}: ${((now - last) / 1000).toFixed(2)} s`);
    last = now;
  };
}

/** The uploaded file as the route hands it over. */
export interface Upload {
  fileName: string;
  bytes: Buffer;
}

/** The preview an import answers with (POST /api/imports) and keeps until commit. */
export type ImportPreview = Pick<
  UploadAnalysis,
  'sheetName' | 'header' | 'topRows' | 'summary' | 'problems' | 'missingRooms' | 'roomChanges' | 'newSchools'
> & {
  id: string;
  status: 'previewed';
  fileName: string;
  problemsTruncated: boolean;
  /** Whether blank cells clear stored values (chosen at upload). */
  clearBlanks: boolean;
  /** Whether rows were rejected: GET /api/imports/{id}/rejected.xlsx gives them back with what to fix. */
  hasRejectedRows: boolean;
  /** How the subscription changes if the new schools are imported (null when none, or for a school-limited member). */
  subscriptionChange?: QuantityChangePreview | null;
};

/** .xlsx or .csv from the file name; anything else is refused with what to do. */
export function fileKindOf(fileName: string): 'xlsx' | 'csv' {
  const lower = fileName.toLowerCase();
  if (lower.endsWith('.xlsx') || lower.endsWith('.xlsm')) return 'xlsx';
  if (lower.endsWith('.csv') || lower.endsWith('.txt')) return 'csv';
  if (lower.endsWith('.xls'))
    throw badRequest(
      'Old-style .xls workbooks cannot be read. Save the file as .xlsx (Excel Workbook) and upload it again.',
    );
  throw badRequest(
    `"${fileName}" is not a spreadsheet we can read. Upload an Excel workbook (.xlsx) or a CSV file (.csv).`,
  );
}

/** Reads, validates and compares an upload with the estate; stores the preview. Writes nothing to the estate. */
export async function previewImport(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  upload: Upload,
  options: ImportOptions = {},
): Promise<ImportPreview> {
  if (upload.bytes.length > MAX_FILE_BYTES) throw fileTooLarge(upload.bytes.length);
  if (upload.bytes.length === 0) throw badRequest('The file is empty. Choose the register file again.');
  const kind = fileKindOf(upload.fileName);
  const mark = stepTimer('preview');
  const [saved, snapshot, fingerprint] = await Promise.all([
    loadSavedMappings(db, trust.id),
    loadEstateRecords(db, trust).then((records) => estateSnapshot(records, trust)),
    estateFingerprint(db, trust),
  ]);
  mark('load the estate');
  const analysis = await analyseUploadIsolated(upload.bytes, kind, saved, options, snapshot, config().importTimings);
  mark('read, check and compare with the estate (worker)');

  const id = await db.transaction().execute(async (trx) => {
    if (analysis.mappedPairs.length) await saveMappings(trx, trust.id, analysis.mappedPairs);
    const row = await trx
      .insertInto('register_imports')
      .values({
        trust_id: trust.id,
        created_by_user_id: actor.actorUserId,
        created_by_email: actor.actorEmail,
        file_name: upload.fileName.slice(0, 255),
        file_kind: kind,
        file_size_bytes: upload.bytes.length,
        header: JSON.stringify({ ...analysis.header, sheetName: analysis.sheetName }),
        summary: JSON.stringify(analysis.summary),
        problems: JSON.stringify(analysis.problems),
        problem_count: analysis.problemCount,
        missing_rooms: JSON.stringify(analysis.missingRooms),
        room_changes: JSON.stringify({ clearBlanks: options.clearBlanks === true, rooms: analysis.roomChanges }),
        rows_gz: analysis.rowsGz,
        new_schools: JSON.stringify(analysis.newSchools),
        rejected_rows_gz: analysis.rejectedRowsGz,
        estate_fingerprint: fingerprint,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'import.previewed',
      entityType: 'import',
      entityId: row.id,
      summary: `Uploaded ${upload.fileName} for preview: ${analysis.summary.roomsToCreate} rooms to create, ${analysis.summary.roomsToChange} to change, ${analysis.summary.rowsRejected} rows rejected`,
    });
    return row.id;
  });
  mark('store the preview');
  const subscriptionChange = await schoolCountNotice(db, trust, analysis.summary.schoolsToCreate);
  return {
    id,
    status: 'previewed',
    fileName: upload.fileName,
    sheetName: analysis.sheetName,
    header: analysis.header,
    topRows: analysis.topRows,
    summary: analysis.summary,
    problems: analysis.problems,
    problemsTruncated: analysis.problemCount > analysis.problems.length,
    missingRooms: analysis.missingRooms,
    roomChanges: analysis.roomChanges,
    newSchools: analysis.newSchools,
    clearBlanks: options.clearBlanks === true,
    hasRejectedRows: analysis.rejectedRowsGz !== null,
    subscriptionChange,
  };
}

/** Outcome of a commit or cancel, as stored on the import and answered to the client. */
export interface ImportOutcome {
  status: 'committed' | 'cancelled';
  schoolsCreated: number;
  blocksCreated: number;
  roomsCreated: number;
  roomsChanged: number;
  roomsUnchanged: number;
  roomsDeleted: number;
  rowsRejected: number;
}

/** Test seam: runs inside the commit transaction after the writes, before it commits. */
export type CommitHook = (trx: Kysely<Database>) => Promise<void>;

/**
 * Applies a previewed import in one transaction, provided the estate is still as it was at the
 * preview (otherwise 409: a change made since is never overwritten blindly). "none" cancels.
 */
export async function commitImport(
  pool: pg.Pool,
  trust: ActiveTrust,
  actor: Actor,
  importId: string,
  body: CommitBody,
  beforeCommit?: CommitHook,
): Promise<ImportOutcome> {
  return withConnection(pool, (db, client) =>
    db.transaction().execute(async (trx) => {
      const found = await trx
        .selectFrom('register_imports')
        .select(['id', 'status', 'rows_gz', 'file_name', 'estate_fingerprint', 'created_by_user_id'])
        .where('id', '=', importId)
        .where('trust_id', '=', trust.id)
        .forUpdate()
        .executeTakeFirst();
      // A member limited to some schools commits only their own previews (another's spans other schools).
      if (!found || (trust.schoolIds !== null && found.created_by_user_id !== actor.actorUserId))
        throw notFound('That import');
      if (found.status !== 'previewed' || !found.rows_gz)
        throw conflict(`This import is already ${found.status}; upload the file again to import it.`);
      const audit = { trustId: trust.id, ...actor, entityType: 'import', entityId: importId };
      if (body.rows === 'none') {
        const outcome: ImportOutcome = {
          status: 'cancelled',
          schoolsCreated: 0,
          blocksCreated: 0,
          roomsCreated: 0,
          roomsChanged: 0,
          roomsUnchanged: 0,
          roomsDeleted: 0,
          rowsRejected: 0,
        };
        await trx
          .updateTable('register_imports')
          .set({ status: 'cancelled', rows_gz: null, outcome: JSON.stringify(outcome) })
          .where('id', '=', importId)
          .execute();
        await recordAudit(trx, {
          ...audit,
          action: 'import.cancelled',
          summary: `Cancelled the import of ${found.file_name}; nothing was changed`,
        });
        return outcome;
      }
      const mark = stepTimer('commit');
      // One commit at a time per trust, so two imports cannot both pass the check below and then clash.
      await sql`SELECT pg_advisory_xact_lock(hashtext(${`register:${trust.id}`}))`.execute(trx);
      if (found.estate_fingerprint !== (await estateFingerprint(trx, trust))) {
        throw conflict(
          'The register has changed since this preview (someone edited, added or imported rooms). Upload the file again to see an up-to-date preview.',
        );
      }
      const { plan, roomLines } = decodePlan(found.rows_gz);
      mark('check the estate is as previewed and unpack the plan');
      await assertWithinPlan(trx, trust.id, {
        schools: plan.summary.schoolsToCreate,
        rooms: plan.summary.roomsToCreate,
      });
      const { roomsDeleted } = await applyPlan(trx, client, trust, actor, plan, roomLines, body.deleteMissing);
      mark('write schools, blocks, rooms and audit');
      const outcome: ImportOutcome = {
        status: 'committed',
        schoolsCreated: plan.summary.schoolsToCreate,
        blocksCreated: plan.summary.blocksToCreate,
        roomsCreated: plan.summary.roomsToCreate,
        roomsChanged: plan.summary.roomsToChange,
        roomsUnchanged: plan.summary.roomsUnchanged,
        roomsDeleted,
        rowsRejected: plan.summary.rowsRejected,
      };
      await trx
        .updateTable('register_imports')
        .set({
          status: 'committed',
          rows_gz: null,
          outcome: JSON.stringify(outcome),
          committed_by_email: actor.actorEmail,
          committed_at: sql<Date>`now()`,
        })
        .where('id', '=', importId)
        .execute();
      await recordAudit(trx, {
        ...audit,
        action: 'import.committed',
        summary: `Imported ${found.file_name}: ${outcome.roomsCreated} rooms created, ${outcome.roomsChanged} changed, ${outcome.roomsDeleted} deleted, ${outcome.rowsRejected} rows rejected`,
        after: outcome,
      });
      if (beforeCommit) await beforeCommit(trx);
      return outcome;
    }),
  );
}

/** One line of the import history. */
export interface ImportHistoryItem {
  id: string;
  fileName: string;
  fileKind: string;
  status: string;
  createdAt: string;
  createdByEmail: string | null;
  committedAt: string | null;
  summary: ImportSummary;
  problemCount: number;
  outcome: ImportOutcome | null;
}

/** Who reads the import history: a member limited to some schools sees only the imports they uploaded. */
export interface ImportViewer {
  trust: ActiveTrust;
  userId: string;
}

/** The imports a viewer may see: the trust's, or only their own when they are limited to some schools. */
function visibleImports(db: Kysely<Database>, viewer: ImportViewer) {
  const q = db.selectFrom('register_imports').where('trust_id', '=', viewer.trust.id);
  return viewer.trust.schoolIds === null ? q : q.where('created_by_user_id', '=', viewer.userId);
}

/** The trust's imports, newest first (a school-limited member's own only: others' name other schools' rooms). */
export async function listImports(
  db: Kysely<Database>,
  viewer: ImportViewer,
  limit = 50,
): Promise<ImportHistoryItem[]> {
  const rows = await visibleImports(db, viewer)
    .select([
      'id',
      'file_name',
      'file_kind',
      'status',
      'created_at',
      'created_by_email',
      'committed_at',
      'summary',
      'problem_count',
      'outcome',
    ])
    .orderBy('created_at', 'desc')
    .limit(limit)
    .execute();
  return rows.map((r) => ({
    id: r.id,
    fileName: r.file_name,
    fileKind: r.file_kind,
    status: r.status,
    createdAt: r.created_at.toISOString(),
    createdByEmail: r.created_by_email,
    committedAt: r.committed_at?.toISOString() ?? null,
    summary: r.summary as ImportSummary,
    problemCount: r.problem_count,
    outcome: (r.outcome as ImportOutcome | null) ?? null,
  }));
}

/**
 * One import with its stored preview (problems and rooms missing from the file). A member limited to some
 * schools gets only their own imports, and of the missing rooms only those still in their schools.
 */
export async function getImport(db: Kysely<Database>, viewer: ImportViewer, id: string) {
  const r = await visibleImports(db, viewer)
    .select([
      'id',
      'file_name',
      'file_kind',
      'status',
      'created_at',
      'created_by_email',
      'committed_at',
      'summary',
      'problems',
      'problem_count',
      'missing_rooms',
      'room_changes',
      'outcome',
      'header',
      'new_schools',
      sql<boolean>`rejected_rows_gz IS NOT NULL`.as('has_rejected_rows'),
    ])
    .where('id', '=', id)
    .executeTakeFirst();
  if (!r) throw notFound('That import');
  let missingRooms = r.missing_rooms as unknown as ImportPlan['missingRooms'];
  const schoolIds = viewer.trust.schoolIds;
  if (schoolIds !== null && missingRooms.length > 0) {
    const allowed = await db
      .selectFrom('rooms')
      .select('id')
      .where(
        'id',
        'in',
        missingRooms.map((m) => m.id),
      )
      .where('school_id', 'in', schoolIds.length ? schoolIds : ['00000000-0000-0000-0000-000000000000'])
      .execute();
    const ids = new Set(allowed.map((a) => a.id));
    missingRooms = missingRooms.filter((m) => ids.has(m.id));
  }
  return {
    id: r.id,
    fileName: r.file_name,
    fileKind: r.file_kind,
    status: r.status,
    createdAt: r.created_at.toISOString(),
    createdByEmail: r.created_by_email,
    committedAt: r.committed_at?.toISOString() ?? null,
    summary: r.summary as ImportSummary,
    problems: r.problems as unknown as ImportProblem[],
    problemCount: r.problem_count,
    missingRooms,
    outcome: r.outcome as ImportOutcome | null,
    header: r.header,
    newSchools: (r.new_schools ?? []) as unknown as NewSchool[],
    hasRejectedRows: r.has_rejected_rows,
  };
}

/** An import's rejected rows with the file's header (404 when the import is not the viewer's or rejected nothing). */
export async function getRejectedRows(db: Kysely<Database>, viewer: ImportViewer, id: string): Promise<RejectedRows> {
  const r = await visibleImports(db, viewer).select(['rejected_rows_gz']).where('id', '=', id).executeTakeFirst();
  if (!r) throw notFound('That import');
  if (!r.rejected_rows_gz) throw noRejectedRows();
  return decodeRejectedRows(r.rejected_rows_gz);
}
