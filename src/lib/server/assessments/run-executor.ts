/**
 * Works assessment runs chunk by chunk, in whichever process the chunk's job lands: the web app's own workers or
 * `npm run worker` processes on any machine. A worker claims a chunk, beats its heartbeat, reads and assesses its
 * rooms, and commits the results with the chunk's input snapshot; the worker that commits a run's last chunk makes
 * the run current, ranks the trust and applies the retention rule.
 */
import { randomUUID } from 'node:crypto';
import { hostname } from 'node:os';
import { EngineInputError, type AssumptionSet } from '../../engine';
import type { RunProblem } from '../../../../db/tables/assessments';
import { type Kysely, sql } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import { assessWithEvidence } from '../monitor-logs/evidence.repository';
import { refreshRanks } from '../portfolio/ranking.repository';
import { getAssumptionSetById } from './assumptions.repository';
import { beatChunk, type Chunk, ChunkTakenOver, claimChunk, commitChunk, releaseChunk } from './chunks.repository';
import { readChunkRooms } from './engine-input.repository';
import { encodeRooms } from './input-snapshot';
import { toResultRow, type ResultRow } from './result-row';
import { deleteRunResults, makeRunCurrent } from './results.repository';
import { pruneRuns } from './retention.service';
import { getRun, markFailed } from './runs.repository';

/** How often a worker tells the database it is still working a chunk. */
export const HEARTBEAT_MS = 5_000;
/** A chunk whose worker has been silent this long is taken as abandoned and handed to another worker. */
export const DEAD_AFTER_SECONDS = 20;
/** A run of this many rooms has room_results analysed before its ranks are read (finishRun). */
export const ANALYSE_RESULTS_FROM_ROOMS = 50_000;
/** Times a chunk is claimed before its run fails: the first attempt and two more. */
export const MAX_ATTEMPTS = 3;
/**
 * This process as a worker: host, process id and a nonce for this start (a restarted process with the same id is
 * another worker). The sweep (queue.ts) reads it to tell a dead worker on this host at once.
 */
export const WORKER_ID = `${hostname()}/${process.pid}/${randomUUID().slice(0, 8)}`;

/** What one job did: no chunk was free, a chunk was committed, the run finished, the chunk will be tried again, or the run failed. */
export type ChunkOutcome = 'none' | 'done' | 'finished' | 'retry' | 'failed';

export interface WorkOptions {
  /** Who works the chunk (this process by default). */
  workerId?: string;
  /** Called after the chunk's rooms are assessed, before the commit (tests use it to stall or break a worker). */
  beforeCommit?: (chunk: Chunk) => void | Promise<void>;
}

/** Assumption sets of runs being worked here, so each chunk does not read its run's set again. */
const setsOfRuns = new Map<string, AssumptionSet | null>();

async function assumptionsOf(
  db: Kysely<Database>,
  runId: string,
  trustId: string,
  setId: string | null,
): Promise<AssumptionSet | null> {
  if (setsOfRuns.has(runId)) return setsOfRuns.get(runId) ?? null;
  const stored = setId ? await getAssumptionSetById(db, trustId, setId) : null;
  if (setsOfRuns.size > 50) setsOfRuns.clear();
  setsOfRuns.set(runId, stored?.set ?? null);
  return stored?.set ?? null;
}

/** Beats the chunk's heartbeat until stopped; `lost` turns true once the chunk is no longer this worker's. */
function startHeartbeat(db: Kysely<Database>, chunk: Chunk, workerId: string) {
  const state = { lost: false, stop: () => clearInterval(timer) };
  let beating = false;
  const timer = setInterval(() => {
    if (beating) return;
    beating = true;
    beatChunk(db, chunk, workerId)
      .then((mine) => {
        if (!mine) state.lost = true;
      })
      .catch((error: unknown) => console.error('Assessment heartbeat failed', error))
      .finally(() => {
        beating = false;
      });
  }, HEARTBEAT_MS);
  timer.unref();
  return state;
}

/** Assesses a chunk's rooms: result rows, the rooms the engine refused (with its reason) and the input snapshot. */
async function assessChunk(
  db: Kysely<Database>,
  chunk: Chunk,
  set: AssumptionSet,
): Promise<{ rows: ResultRow[]; problems: RunProblem[]; inputs: Buffer }> {
  const rooms = await readChunkRooms(db, chunk);
  // The snapshot is compressed on the thread pool while this thread assesses.
  const inputs = encodeRooms(rooms);
  inputs.catch(() => undefined); // awaited below; an engine error first must not leave it unhandled
  const rows: ResultRow[] = [];
  const problems: RunProblem[] = [];
  for (const room of rooms) {
    try {
      rows.push(toResultRow(chunk.runId, room, assessWithEvidence(room, set, { withCurve: false })));
    } catch (error) {
      if (!(error instanceof EngineInputError)) throw error;
      problems.push({ roomId: room.roomId, roomCode: room.roomCode, field: error.field, message: error.message });
    }
  }
  return { rows, problems, inputs: await inputs };
}

/** Plain words for an unexpected error, for the run's `error` field. */
const describe = (error: unknown) => (error instanceof Error ? error.message : String(error));

/**
 * Works one chunk of the run, if one is pending (never started, or handed back by the sweep): claims it, assesses its rooms
 * and commits them; the worker committing the run's last chunk finishes the run. An unexpected error hands the chunk
 * back for another attempt, or after its last attempt fails the run and removes its rows.
 */
export async function workNextChunk(
  db: Kysely<Database>,
  pool: pg.Pool,
  runId: string,
  options: WorkOptions = {},
): Promise<ChunkOutcome> {
  const workerId = options.workerId ?? WORKER_ID;
  const run = await getRun(db, runId, null);
  if (!run || (run.status !== 'queued' && run.status !== 'running')) return 'none';
  const set = await assumptionsOf(db, runId, run.trustId, run.assumptionSetId);
  if (!set) {
    await failRun(db, runId, 'The assumption set this run was started with no longer exists. Start a new run.');
    return 'failed';
  }
  const chunk = await claimChunk(db, runId, workerId);
  if (!chunk) {
    // Nothing left to claim: the run may be complete with its switch to current still to do.
    if (run.chunksDone >= run.chunksTotal) return (await finishRun(db, runId)) ? 'finished' : 'none';
    return 'none';
  }
  const heartbeat = startHeartbeat(db, chunk, workerId);
  try {
    const { rows, problems, inputs } = await assessChunk(db, chunk, set);
    await options.beforeCommit?.(chunk);
    if (heartbeat.lost) throw new ChunkTakenOver(chunk);
    const progress = await commitChunk(pool, chunk, workerId, rows, inputs, problems);
    if (progress.chunksDone < progress.chunksTotal) return 'done';
    return (await finishRun(db, runId)) ? 'finished' : 'done';
  } catch (error) {
    if (error instanceof ChunkTakenOver) return 'none';
    if (chunk.attempts >= MAX_ATTEMPTS) {
      await failRun(
        db,
        runId,
        `A part of the run stopped with an error ${chunk.attempts} times; the last: ${describe(error)}. Start a new run.`,
      );
      return 'failed';
    }
    console.error(`Assessment chunk ${chunk.chunkNo} of run ${runId} failed (attempt ${chunk.attempts})`, error);
    await releaseChunk(db, chunk, workerId);
    return 'retry';
  } finally {
    heartbeat.stop();
  }
}

/**
 * Finishes a run whose chunks are all done: makes its results current in one transaction, then ranks the trust (so
 * the first page read after a run does not wait for it) and prunes runs beyond the trust's retention rule. False when
 * the run was not ready or another worker finished it.
 */
export async function finishRun(db: Kysely<Database>, runId: string): Promise<boolean> {
  if (!(await makeRunCurrent(db, runId))) return false;
  // The planner's statistics of assessment_current (one row per school, so a quick ANALYZE) must know the trust's
  // schools before the ranks read its results: with statistics from before a trust's first run, it counted one school
  // and read 550,000 results by index, one school at a time (59 s and 144 s in two benchmark runs, against 5 s).
  await sql`ANALYZE assessment_current`.execute(db);
  setsOfRuns.delete(runId);
  const run = await getRun(db, runId, null);
  if (run) {
    // Until autovacuum analyses room_results (up to a minute later), its statistics do not know the new run's rows:
    // for a run of 550,000 rooms the planner estimated 373 current results, and once read them for the ranks in 78 s
    // (3-5 s otherwise). ANALYZE samples a fixed 30,000 rows (1.1 s at 2.8 million rows here), so only big runs pay it,
    // and only for the columns the ranks' read joins on: that also counts the table's rows, in half the time (0.15-0.22
    // s against 0.33-0.40 s at 2.25 million rows); autovacuum analyses the other columns later.
    if (run.roomsTotal >= ANALYSE_RESULTS_FROM_ROOMS) await sql`ANALYZE room_results (run_id, school_id)`.execute(db);
    await refreshRanks(db, run.trustId);
    await pruneRuns(db, run.trustId);
  }
  return true;
}

/** Works every chunk of a run in this process until it has finished (the demo seed, benchmarks and tests). */
export async function workRunHere(
  db: Kysely<Database>,
  pool: pg.Pool,
  runId: string,
  options: WorkOptions = {},
): Promise<void> {
  for (;;) {
    const outcome = await workNextChunk(db, pool, runId, options);
    if (outcome === 'finished' || outcome === 'failed') return;
    if (outcome === 'none') {
      const run = await getRun(db, runId, null);
      if (!run || run.status === 'succeeded' || run.status === 'failed') return;
      if (run.chunksDone >= run.chunksTotal && (await finishRun(db, runId))) return;
      // Every free chunk is held by another worker: wait for them.
      await new Promise((resolve) => setTimeout(resolve, 200));
    }
  }
}

/** Fails a run and deletes the results it wrote (none of them ever became current). */
export async function failRun(db: Kysely<Database>, runId: string, message: string): Promise<void> {
  await markFailed(db, runId, message);
  await deleteRunResults(db, runId);
  setsOfRuns.delete(runId);
}
