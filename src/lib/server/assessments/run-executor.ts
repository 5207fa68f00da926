import { EngineInputError, type AssumptionSet } from '../../engine';
import { assessWithEvidence } from '../monitor-logs/evidence.repository';
import type { RunProblem } from '../../../../db/tables/assessments';
import { getDb, getPool } from '../db/client';
import { getAssumptionSetById } from './assumptions.repository';
import { readRoomChunk } from './engine-input.repository';
import { toResultRow, type ResultRow } from './result-row';
import { commitChunk, deleteNonCurrentResults, flipRunCurrent } from './results.repository';
import { getRun, markFailed, markRunning, noteRetry, type Run } from './runs.repository';

export interface ExecuteOptions {
  /** Rooms per chunk; by default a twentieth of the run, between 100 and 2,000. */
  chunkSize?: number;
  /** Called after each committed chunk with the rooms done so far (progress hooks; tests use it to stop a run midway). */
  afterChunk?: (roomsDone: number) => void | Promise<void>;
}

/** Rooms per chunk: small runs still show progress, big runs write in large batches. */
export const defaultChunkSize = (roomsTotal: number) => Math.min(2000, Math.max(100, Math.ceil(roomsTotal / 20)));

/**
 * Works one run to the end, resuming after the last committed chunk when an earlier attempt stopped.
 * Each chunk reads rooms, assesses them without curves, and writes its results (not yet current) with
 * the run's progress in one transaction; at the end the run is flipped current in one transaction.
 * Throws on any unexpected error and leaves the run resumable: the caller decides to retry or fail it.
 */
export async function executeRun(runId: string, options: ExecuteOptions = {}): Promise<void> {
  const db = getDb();
  const run = await getRun(db, runId, null);
  if (!run || run.status === 'succeeded' || run.status === 'failed') return;
  const stored = run.assumptionSetId ? await getAssumptionSetById(db, run.trustId, run.assumptionSetId) : null;
  if (!stored) {
    await markFailed(db, runId, 'The assumption set this run was started with no longer exists. Start a new run.');
    return;
  }
  if (!(await markRunning(db, runId))) return;

  const chunkSize = options.chunkSize ?? defaultChunkSize(run.roomsTotal);
  await assessAndWrite(run, stored.set, chunkSize, options.afterChunk);
  await flipRunCurrent(db, { runId, trustId: run.trustId, schoolId: run.schoolId });
}

/**
 * Reads, assesses and commits the run's rooms chunk by chunk after its resume point. One chunk's COPY runs in Postgres while the next chunk is
 * read and assessed here, so on two cores the engine's time hides behind the database's; commits stay
 * strictly in order, one at a time, so the resume point always matches what is written.
 */
async function assessAndWrite(
  run: Run,
  set: AssumptionSet,
  chunkSize: number,
  afterChunk: ExecuteOptions['afterChunk'],
): Promise<void> {
  const db = getDb();
  const scope = { trustId: run.trustId, schoolId: run.schoolId };
  let cursor = run.resumeAfterRoomId;
  let roomsDone = run.roomsDone;
  let pending: Promise<void> = Promise.resolve();
  try {
    for (;;) {
      const rooms = await readRoomChunk(db, scope, cursor, chunkSize);
      if (rooms.length === 0) break;
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
      cursor = rooms[rooms.length - 1]!.roomId;
      await pending;
      const chunk = { roomsDone: rooms.length, lastRoomId: cursor, problems };
      pending = commitChunk(getPool(), run.id, rows, chunk).then(async () => {
        roomsDone += chunk.roomsDone;
        await afterChunk?.(roomsDone);
      });
      pending.catch(() => undefined); // observed by the next `await pending`
    }
    await pending;
  } catch (error) {
    // Let a commit in flight land before the caller decides to retry or clean up.
    await pending.catch(() => undefined);
    throw error;
  }
}

/** Plain words for an unexpected error, for the run's `error` field. */
const describe = (error: unknown) => (error instanceof Error ? error.message : String(error));

/**
 * One attempt of the queue's job: work the run; on error either leave it for the queue's retry (which
 * resumes it) or, on the last attempt, fail it cleanly and remove its half-written rows.
 */
export async function attemptRun(
  runId: string,
  attempt: { retryCount: number; retryLimit: number },
  options: ExecuteOptions = {},
): Promise<void> {
  const db = getDb();
  try {
    await executeRun(runId, options);
  } catch (error) {
    if (attempt.retryCount >= attempt.retryLimit) {
      await failRun(runId, `The run stopped with an error: ${describe(error)}`);
    } else {
      await noteRetry(db, runId, describe(error));
    }
    throw error;
  }
}

/** Fails a run and deletes the results it wrote (none of them ever became current). */
export async function failRun(runId: string, message: string): Promise<void> {
  const db = getDb();
  await markFailed(db, runId, message);
  await deleteNonCurrentResults(db, runId);
}
