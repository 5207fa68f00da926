/**
 * A run's chunks: its rooms (fixed at the start, in id order) in pieces that workers on any machine claim one at a
 * time. A claim counts an attempt and starts the chunk's heartbeat; a commit writes the chunk's results, its input
 * snapshot and the run's progress in one transaction, and only while the same worker still holds the chunk, so a room
 * is never counted twice.
 */
import { sql, type Kysely } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import type { RunProblem } from '../../../../db/tables/assessments';
import { copyLines } from '../db/copy';
import type { ResultRow } from './result-row';
import { copyResultsSql, resultPieces } from './results.repository';

/** A chunk as a worker holds it. */
export interface Chunk {
  runId: string;
  chunkNo: number;
  afterRoomId: string | null;
  lastRoomId: string;
  rooms: number;
  attempts: number;
}

/**
 * Splits the rooms in a run's scope now (the trust's, or one school's) into chunks of `chunkSize` in id order, each
 * keeping its rooms' ids (room_ids): the run's snapshot, so rooms added later wait for the next run and a chunk worked
 * again covers the same rooms. Returns how many chunks and rooms. Runs inside the transaction that inserts the run.
 */
export async function createChunks(
  trx: Kysely<Database>,
  runId: string,
  scope: { trustId: string; schoolId: string | null },
  chunkSize: number,
): Promise<{ chunksTotal: number; roomsTotal: number }> {
  const inScope = scope.schoolId === null ? sql`TRUE` : sql`schools.id = ${scope.schoolId}::uuid`;
  const { rows } = await sql<{ rooms: number }>`
    WITH numbered AS (
      SELECT rooms.id, (row_number() OVER (ORDER BY rooms.id) - 1) / ${chunkSize} AS chunk_no
      FROM rooms JOIN schools ON schools.id = rooms.school_id
      WHERE schools.trust_id = ${scope.trustId} AND ${inScope}
    ), chunks AS (
      SELECT chunk_no, array_agg(id ORDER BY id) AS ids FROM numbered GROUP BY chunk_no
    )
    INSERT INTO assessment_run_chunks (run_id, chunk_no, after_room_id, last_room_id, rooms, room_ids)
    SELECT ${runId}::uuid, chunk_no, lag(ids[cardinality(ids)]) OVER (ORDER BY chunk_no), ids[cardinality(ids)],
      cardinality(ids), ids
    FROM chunks
    RETURNING rooms`.execute(trx);
  const roomsTotal = rows.reduce((sum, r) => sum + r.rooms, 0);
  await trx
    .updateTable('assessment_runs')
    .set({ chunks_total: rows.length, rooms_total: roomsTotal })
    .where('id', '=', runId)
    .execute();
  return { chunksTotal: rows.length, roomsTotal };
}

/**
 * Claims the run's next pending chunk for a worker, counts the attempt, and marks the run running. Null when no chunk
 * is pending (all done or held, or the run has finished). A chunk whose worker fell silent is pending again only once
 * the sweep has handed it back, which sends a job for it: every pending chunk has a job of its own, so a worker that
 * takes over a silent chunk never uses up the job of another chunk.
 */
export async function claimChunk(db: Kysely<Database>, runId: string, workerId: string): Promise<Chunk | null> {
  const { rows } = await sql<{
    run_id: string;
    chunk_no: number;
    after_room_id: string | null;
    last_room_id: string;
    rooms: number;
    attempts: number;
  }>`
    WITH free AS (
      SELECT c.run_id, c.chunk_no FROM assessment_run_chunks c JOIN assessment_runs r ON r.id = c.run_id
      WHERE c.run_id = ${runId}::uuid AND r.status IN ('queued', 'running') AND c.status = 'pending'
      ORDER BY c.chunk_no LIMIT 1 FOR UPDATE OF c SKIP LOCKED
    ), claimed AS (
      UPDATE assessment_run_chunks c SET status = 'running', worker_id = ${workerId}, heartbeat_at = now(),
        attempts = c.attempts + 1
      FROM free WHERE c.run_id = free.run_id AND c.chunk_no = free.chunk_no
      RETURNING c.run_id, c.chunk_no, c.after_room_id, c.last_room_id, c.rooms, c.attempts
    ), started AS (
      UPDATE assessment_runs r SET status = 'running', started_at = COALESCE(r.started_at, now()), heartbeat_at = now(),
        updated_at = now()
      FROM claimed WHERE r.id = claimed.run_id AND r.status = 'queued'
    )
    SELECT * FROM claimed`.execute(db);
  const row = rows[0];
  return row
    ? {
        runId: row.run_id,
        chunkNo: row.chunk_no,
        afterRoomId: row.after_room_id,
        lastRoomId: row.last_room_id,
        rooms: row.rooms,
        attempts: row.attempts,
      }
    : null;
}

/** The worker says it is still working the chunk; false when the chunk is no longer its own. */
export async function beatChunk(db: Kysely<Database>, chunk: Chunk, workerId: string): Promise<boolean> {
  const result = await db
    .updateTable('assessment_run_chunks')
    .set({ heartbeat_at: sql`now()` })
    .where('run_id', '=', chunk.runId)
    .where('chunk_no', '=', chunk.chunkNo)
    .where('worker_id', '=', workerId)
    .where('status', '=', 'running')
    .executeTakeFirst();
  return Number(result.numUpdatedRows) > 0;
}

/** The chunk was taken over by another worker (this one was thought dead): stop without touching it. */
export class ChunkTakenOver extends Error {
  constructor(chunk: Chunk) {
    super(`Another worker is working chunk ${chunk.chunkNo} of run ${chunk.runId} now`);
    this.name = 'ChunkTakenOver';
  }
}

/**
 * Commits a chunk: its result rows, its input snapshot, the chunk done and the run's progress, in one transaction,
 * only while `workerId` still holds the chunk (ChunkTakenOver otherwise, and nothing is written). Returns the run's
 * chunks done and total after the commit, so the worker that commits the last one finishes the run.
 */
export async function commitChunk(
  pool: pg.Pool,
  chunk: Chunk,
  workerId: string,
  rows: readonly ResultRow[],
  inputs: Buffer,
  problems: readonly RunProblem[],
): Promise<{ chunksDone: number; chunksTotal: number }> {
  const client = await pool.connect();
  try {
    await client.query('BEGIN');
    const done = await client.query(
      `UPDATE assessment_run_chunks SET status = 'done', results = $4, inputs = $5, done_at = now(), heartbeat_at = now()
       WHERE run_id = $1 AND chunk_no = $2 AND worker_id = $3 AND status = 'running'`,
      [chunk.runId, chunk.chunkNo, workerId, rows.length, inputs],
    );
    if (done.rowCount !== 1) throw new ChunkTakenOver(chunk);
    if (rows.length > 0) await copyLines(client, copyResultsSql(), resultPieces(rows));
    const progress = await client.query<{ chunks_done: number; chunks_total: number }>(
      `UPDATE assessment_runs SET rooms_done = rooms_done + $2, chunks_done = chunks_done + 1,
         problems = CASE WHEN $3::jsonb = '[]'::jsonb THEN problems ELSE problems || $3::jsonb END,
         heartbeat_at = now(), updated_at = now()
       WHERE id = $1 RETURNING chunks_done, chunks_total`,
      [chunk.runId, chunk.rooms, JSON.stringify(problems)],
    );
    await client.query('COMMIT');
    const run = progress.rows[0];
    return { chunksDone: run?.chunks_done ?? 0, chunksTotal: run?.chunks_total ?? 0 };
  } catch (error) {
    await client.query('ROLLBACK').catch(() => undefined);
    throw error;
  } finally {
    client.release();
  }
}

/** Hands a chunk back after an error (only while `workerId` holds it), so another attempt can claim it at once. */
export async function releaseChunk(db: Kysely<Database>, chunk: Chunk, workerId: string): Promise<void> {
  await db
    .updateTable('assessment_run_chunks')
    .set({ status: 'pending', worker_id: null })
    .where('run_id', '=', chunk.runId)
    .where('chunk_no', '=', chunk.chunkNo)
    .where('worker_id', '=', workerId)
    .where('status', '=', 'running')
    .execute();
}

/** Chunks being worked, with their worker and whether it has been silent for `deadAfterSeconds` (for the sweep). */
export async function runningChunks(
  db: Kysely<Database>,
  deadAfterSeconds: number,
): Promise<{ runId: string; chunkNo: number; workerId: string | null; attempts: number; silent: boolean }[]> {
  const rows = await db
    .selectFrom('assessment_run_chunks')
    .innerJoin('assessment_runs', 'assessment_runs.id', 'assessment_run_chunks.run_id')
    .select([
      'assessment_run_chunks.run_id',
      'assessment_run_chunks.chunk_no',
      'assessment_run_chunks.worker_id',
      'assessment_run_chunks.attempts',
      sql<boolean>`assessment_run_chunks.heartbeat_at < now() - make_interval(secs => ${deadAfterSeconds})`.as(
        'silent',
      ),
    ])
    .where('assessment_run_chunks.status', '=', 'running')
    .where('assessment_runs.status', '=', 'running')
    .execute();
  return rows.map((r) => ({
    runId: r.run_id,
    chunkNo: r.chunk_no,
    workerId: r.worker_id,
    attempts: r.attempts,
    silent: r.silent,
  }));
}

/**
 * Hands back a chunk whose worker is gone (still held by `workerId`); true when it did. The next claim of the run
 * takes it.
 */
export async function reclaimChunk(
  db: Kysely<Database>,
  runId: string,
  chunkNo: number,
  workerId: string | null,
): Promise<boolean> {
  let q = db
    .updateTable('assessment_run_chunks')
    .set({ status: 'pending', worker_id: null })
    .where('run_id', '=', runId)
    .where('chunk_no', '=', chunkNo)
    .where('status', '=', 'running');
  q = workerId === null ? q.where('worker_id', 'is', null) : q.where('worker_id', '=', workerId);
  const result = await q.executeTakeFirst();
  return Number(result.numUpdatedRows) > 0;
}

/** How a run's chunks stand: pending, being worked, done. */
export async function chunkCounts(
  db: Kysely<Database>,
  runIds: readonly string[],
): Promise<Map<string, { pending: number; running: number; done: number }>> {
  const counts = new Map<string, { pending: number; running: number; done: number }>();
  if (runIds.length === 0) return counts;
  const rows = await db
    .selectFrom('assessment_run_chunks')
    .select(['run_id', 'status', sql<number>`count(*)::int`.as('n')])
    .where('run_id', 'in', runIds)
    .groupBy(['run_id', 'status'])
    .execute();
  for (const r of rows) {
    const c = counts.get(r.run_id) ?? { pending: 0, running: 0, done: 0 };
    c[r.status] = r.n;
    counts.set(r.run_id, c);
  }
  return counts;
}

/** The snapshot of the chunk holding `roomId` in a run (null when the run kept none for it). */
export async function chunkInputsOf(db: Kysely<Database>, runId: string, roomId: string): Promise<Buffer | null> {
  const row = await db
    .selectFrom('assessment_run_chunks')
    .select('inputs')
    .where('run_id', '=', runId)
    .where('status', '=', 'done')
    .where('last_room_id', '>=', roomId)
    .where((eb) => eb.or([eb('after_room_id', 'is', null), eb('after_room_id', '<', roomId)]))
    .executeTakeFirst();
  return row?.inputs ?? null;
}

/** How many of each run's snapshot rooms (its chunks' rooms) are in `schoolIds` and still in the register. */
export async function snapshotRoomsInSchools(
  db: Kysely<Database>,
  runIds: readonly string[],
  schoolIds: readonly string[],
): Promise<{ run_id: string; n: number }[]> {
  const { rows } = await sql<{ run_id: string; n: number }>`
    SELECT c.run_id, count(*)::int AS n
    FROM assessment_run_chunks c CROSS JOIN LATERAL unnest(c.room_ids) AS ids(room_id)
      JOIN rooms ON rooms.id = ids.room_id
    WHERE c.run_id = ANY(${[...runIds]}::uuid[]) AND rooms.school_id = ANY(${[...schoolIds]}::uuid[])
    GROUP BY c.run_id`.execute(db);
  return rows;
}
