import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { RunProblem } from '../../../../db/tables/assessments';
import { createChunks } from './chunks.repository';

export type RunStatus = 'queued' | 'running' | 'succeeded' | 'failed';

/** An assessment run as the API and pages show it. */
export interface Run {
  id: string;
  trustId: string;
  scope: 'trust' | 'school';
  schoolId: string | null;
  schoolName: string | null;
  status: RunStatus;
  roomsDone: number;
  roomsTotal: number;
  assumptionSetId: string | null;
  assumptionsVersion: string | null;
  startedByEmail: string | null;
  error: string | null;
  problems: RunProblem[];
  /** When a worker last claimed or committed one of its chunks. */
  heartbeatAt: string | null;
  /** The chunks it is split into and how many are committed. */
  chunksTotal: number;
  chunksDone: number;
  /** When the retention rule removed its results. */
  resultsPrunedAt: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  updatedAt: string;
}

const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString());

function runsQuery(db: Kysely<Database>) {
  return db
    .selectFrom('assessment_runs')
    .leftJoin('schools', 'schools.id', 'assessment_runs.school_id')
    .selectAll('assessment_runs')
    .select('schools.name as school_name');
}

type RunRow = Awaited<ReturnType<ReturnType<typeof runsQuery>['executeTakeFirstOrThrow']>>;

const toRun = (r: RunRow): Run => ({
  id: r.id,
  trustId: r.trust_id,
  scope: r.scope,
  schoolId: r.school_id,
  schoolName: r.school_name,
  status: r.status,
  roomsDone: r.rooms_done,
  roomsTotal: r.rooms_total,
  assumptionSetId: r.assumption_set_id,
  assumptionsVersion: r.assumptions_version,
  startedByEmail: r.started_by_email,
  error: r.error,
  problems: r.problems,
  heartbeatAt: iso(r.heartbeat_at),
  chunksTotal: r.chunks_total,
  chunksDone: r.chunks_done,
  resultsPrunedAt: iso(r.results_pruned_at),
  createdAt: iso(r.created_at)!,
  startedAt: iso(r.started_at),
  finishedAt: iso(r.finished_at),
  updatedAt: iso(r.updated_at)!,
});

/** One run by id; `trustId` null only for the worker, which trusts the job it was given. */
export async function getRun(db: Kysely<Database>, id: string, trustId: string | null): Promise<Run | null> {
  let q = runsQuery(db).where('assessment_runs.id', '=', id);
  if (trustId !== null) q = q.where('assessment_runs.trust_id', '=', trustId);
  const row = await q.executeTakeFirst();
  return row ? toRun(row) : null;
}

/** The trust's most recent runs, newest first. */
export async function listRuns(db: Kysely<Database>, trustId: string, limit: number): Promise<Run[]> {
  const rows = await runsQuery(db)
    .where('assessment_runs.trust_id', '=', trustId)
    .orderBy('assessment_runs.created_at', 'desc')
    .limit(limit)
    .execute();
  return rows.map(toRun);
}

/** A queued or running run of exactly this scope, if any. */
export async function findActiveRun(
  db: Kysely<Database>,
  trustId: string,
  schoolId: string | null,
): Promise<Run | null> {
  let q = runsQuery(db)
    .where('assessment_runs.trust_id', '=', trustId)
    .where('assessment_runs.status', 'in', ['queued', 'running']);
  q =
    schoolId === null
      ? q.where('assessment_runs.scope', '=', 'trust')
      : q.where('assessment_runs.school_id', '=', schoolId);
  const row = await q.orderBy('assessment_runs.created_at', 'desc').executeTakeFirst();
  return row ? toRun(row) : null;
}

export interface NewRun {
  trustId: string;
  schoolId: string | null;
  assumptionSetId: string;
  assumptionsVersion: string;
  startedByUserId: string | null;
  startedByEmail: string | null;
}

/** Rooms per chunk: small runs still show progress, big runs write in large batches. */
export const defaultChunkSize = (roomsTotal: number) => Math.min(2000, Math.max(100, Math.ceil(roomsTotal / 20)));

/** The rooms in a run's scope now (to size its chunks). */
async function countRoomsInScope(
  db: Kysely<Database>,
  scope: { trustId: string; schoolId: string | null },
): Promise<number> {
  const inScope = scope.schoolId === null ? sql`TRUE` : sql`schools.id = ${scope.schoolId}::uuid`;
  const { rows } = await sql<{ n: number }>`
    SELECT count(*)::int AS n FROM rooms JOIN schools ON schools.id = rooms.school_id
    WHERE schools.trust_id = ${scope.trustId} AND ${inScope}`.execute(db);
  return rows[0]?.n ?? 0;
}

/**
 * Inserts a queued run with the rooms it will assess, split into chunks: every room in its scope now, kept in its
 * chunks (createChunks), so rooms added later wait for the next run and a chunk worked again covers the same set.
 */
export async function insertRun(
  db: Kysely<Database>,
  run: NewRun,
  chunkSize?: number,
): Promise<{ id: string; roomsTotal: number; chunksTotal: number }> {
  const insert = async (trx: Kysely<Database>) => {
    const { id } = await trx
      .insertInto('assessment_runs')
      .values({
        trust_id: run.trustId,
        scope: run.schoolId === null ? 'trust' : 'school',
        school_id: run.schoolId,
        assumption_set_id: run.assumptionSetId,
        assumptions_version: run.assumptionsVersion,
        started_by_user_id: run.startedByUserId,
        started_by_email: run.startedByEmail,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const scope = { trustId: run.trustId, schoolId: run.schoolId };
    const size = chunkSize ?? defaultChunkSize(await countRoomsInScope(trx, scope));
    const { chunksTotal, roomsTotal } = await createChunks(trx, id, scope, size);
    return { id, roomsTotal, chunksTotal };
  };
  return db.isTransaction ? insert(db) : db.transaction().execute(insert);
}

/** Running runs whose chunks are all done for `idleSeconds` (their finishing worker stopped before switching them). */
export async function runsToFinish(db: Kysely<Database>, idleSeconds: number): Promise<string[]> {
  const rows = await db
    .selectFrom('assessment_runs')
    .select('id')
    .where('status', '=', 'running')
    .whereRef('chunks_done', '>=', 'chunks_total')
    .where('updated_at', '<', sql<Date>`now() - make_interval(secs => ${idleSeconds})`)
    .execute();
  return rows.map((r) => r.id);
}

/** Marks an unfinished run failed with a message a person can act on. */
export async function markFailed(db: Kysely<Database>, id: string, message: string): Promise<void> {
  await db
    .updateTable('assessment_runs')
    .set({ status: 'failed', error: message, finished_at: new Date(), updated_at: new Date() })
    .where('id', '=', id)
    .where('status', 'in', ['queued', 'running'])
    .execute();
}
