import { randomUUID } from 'node:crypto';
import { hostname } from 'node:os';
import { EngineInputError, type AssumptionSet } from '../../engine';
import { assessWithEvidence } from '../monitor-logs/evidence.repository';
import type { RunProblem } from '../../../../db/tables/assessments';
import type { Kysely } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import { getAssumptionSetById } from './assumptions.repository';
import { readRunChunk } from './engine-input.repository';
import { toResultRow, type ResultRow } from './result-row';
import { commitChunk, deleteNonCurrentResults, flipRunCurrent, RunTakenOver } from './results.repository';
import { beat, claimRun, getRun, markFailed, type Run } from './runs.repository';

/** How often a worker tells the database it is still working a run. */
export const HEARTBEAT_MS = 5_000;
/** A running run whose worker has been silent this long is taken as abandoned (resumed or failed). */
export const DEAD_AFTER_SECONDS = 25;
/** Times a run is started before it fails: the first attempt and two resumptions. */
export const MAX_ATTEMPTS = 3;
/**
 * This process as a worker: host, process id and a nonce for this start (a restarted process with the
 * same id is another worker). The sweep (queue.ts) reads it to tell a dead worker on this host at once.
 */
export const WORKER_ID = `${hostname()}/${process.pid}/${randomUUID().slice(0, 8)}`;

export interface ExecuteOptions {
  /** Rooms per chunk; by default a twentieth of the run, between 100 and 2,000. */
  chunkSize?: number;
  /** Called after each committed chunk with the rooms done so far (progress hooks; tests use it to stop a run midway). */
  afterChunk?: (roomsDone: number) => void | Promise<void>;
  /** Who works the run (this process by default). */
  workerId?: string;
}

/** Rooms per chunk: small runs still show progress, big runs write in large batches. */
export const defaultChunkSize = (roomsTotal: number) => Math.min(2000, Math.max(100, Math.ceil(roomsTotal / 20)));

/** Beats the run's heartbeat until stopped; `lost` turns true once the run is no longer this worker's. */
function startHeartbeat(db: Kysely<Database>, runId: string, workerId: string) {
  const state = { lost: false, stop: () => clearInterval(timer) };
  let beating = false;
  const timer = setInterval(() => {
    // One beat at a time: a beat waiting on the switch to current (which locks the run) is not repeated.
    if (beating) return;
    beating = true;
    beat(db, runId, workerId)
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

/**
 * Works one run to the end, resuming after the last committed chunk when an earlier attempt stopped.
 * Claims the run first (a queued run, or one whose worker has gone silent) and beats a heartbeat while
 * working it. Each chunk reads rooms of the run's snapshot, assesses them without curves, and writes
 * their results (not yet current) with the run's progress in one transaction; at the end the run is
 * switched current in one transaction. Returns false when the run was not this worker's to work
 * (finished, or held by another worker); throws on any unexpected error, leaving the run resumable.
 */
export async function executeRun(
  db: Kysely<Database>,
  pool: pg.Pool,
  runId: string,
  options: ExecuteOptions = {},
): Promise<boolean> {
  const workerId = options.workerId ?? WORKER_ID;
  const found = await getRun(db, runId, null);
  if (!found || found.status === 'succeeded' || found.status === 'failed') return false;
  const stored = found.assumptionSetId ? await getAssumptionSetById(db, found.trustId, found.assumptionSetId) : null;
  if (!stored) {
    await markFailed(db, runId, 'The assumption set this run was started with no longer exists. Start a new run.');
    return false;
  }
  if ((await claimRun(db, runId, workerId, DEAD_AFTER_SECONDS)) === null) return false;
  const run = (await getRun(db, runId, null))!;
  const heartbeat = startHeartbeat(db, runId, workerId);
  try {
    const chunkSize = options.chunkSize ?? defaultChunkSize(run.roomsTotal);
    const written = await assessAndWrite(db, pool, run, workerId, stored.set, chunkSize, heartbeat, options.afterChunk);
    const flipped = await flipRunCurrent(
      db,
      { runId, workerId, trustId: run.trustId, schoolId: run.schoolId },
      written,
    );
    if (!flipped) throw new RunTakenOver(runId);
    return true;
  } finally {
    heartbeat.stop();
  }
}

/**
 * Reads, assesses and commits the run's rooms chunk by chunk after its resume point; returns the result
 * rows written. One chunk's COPY runs in Postgres while the next chunk is read and assessed here, so on two
 * cores the engine's time hides behind the database's; commits stay strictly in order, one at a time, so
 * the resume point always matches what is written.
 */
async function assessAndWrite(
  db: Kysely<Database>,
  pool: pg.Pool,
  run: Run,
  workerId: string,
  set: AssumptionSet,
  chunkSize: number,
  heartbeat: { lost: boolean },
  afterChunk: ExecuteOptions['afterChunk'],
): Promise<number> {
  let cursor = run.resumeAfterRoomId;
  let roomsDone = run.roomsDone;
  let written = 0;
  let pending: Promise<void> = Promise.resolve();
  try {
    for (;;) {
      if (heartbeat.lost) throw new RunTakenOver(run.id);
      const { rooms, lastRoomId, covered } = await readRunChunk(db, run.id, cursor, chunkSize);
      if (lastRoomId === null) break;
      const rows: ResultRow[] = [];
      const problems: RunProblem[] = [];
      for (const room of rooms) {
        try {
          const assessment = assessWithEvidence(room, set, { withCurve: false });
          rows.push(toResultRow(run.id, room, assessment));
        } catch (error) {
          if (!(error instanceof EngineInputError)) throw error;
          problems.push({ roomId: room.roomId, roomCode: room.roomCode, field: error.field, message: error.message });
        }
      }
      cursor = lastRoomId;
      await pending;
      const chunk = { roomsDone: covered, lastRoomId, problems };
      pending = commitChunk(pool, { id: run.id, workerId }, rows, chunk).then(async () => {
        roomsDone += chunk.roomsDone;
        written += rows.length;
        await afterChunk?.(roomsDone);
      });
      pending.catch(() => undefined); // observed by the next `await pending`
    }
    await pending;
    return written;
  } catch (error) {
    // Let a commit in flight land before the caller decides to retry or clean up.
    await pending.catch(() => undefined);
    throw error;
  }
}

/** Plain words for an unexpected error, for the run's `error` field. */
const describe = (error: unknown) => (error instanceof Error ? error.message : String(error));

/** What became of one attempt: finished (or not this worker's), to be tried again, or failed for good. */
export type AttemptOutcome = { next: 'none' } | { next: 'retry'; reason: string } | { next: 'failed' };

/**
 * One attempt at a run (the queue's job): work it; on an error either ask for another attempt, or after the
 * last one fail it cleanly and remove its half-written rows. A run another worker took over is left to it.
 */
export async function attemptRun(
  db: Kysely<Database>,
  pool: pg.Pool,
  runId: string,
  options: ExecuteOptions = {},
): Promise<AttemptOutcome> {
  try {
    await executeRun(db, pool, runId, options);
    return { next: 'none' };
  } catch (error) {
    if (error instanceof RunTakenOver) return { next: 'none' };
    const run = await getRun(db, runId, null);
    if (!run || run.status === 'succeeded' || run.status === 'failed') return { next: 'none' };
    if (run.attempts >= MAX_ATTEMPTS) {
      await failRun(db, runId, `The run stopped with an error after ${run.attempts} attempts: ${describe(error)}`);
      return { next: 'failed' };
    }
    return { next: 'retry', reason: describe(error) };
  }
}

/** Fails a run and deletes the results it wrote (none of them ever became current). */
export async function failRun(db: Kysely<Database>, runId: string, message: string): Promise<void> {
  await markFailed(db, runId, message);
  await deleteNonCurrentResults(db, runId);
}
