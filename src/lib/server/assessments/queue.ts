import { hostname } from 'node:os';
import type { Kysely } from 'kysely';
import PgBoss from 'pg-boss';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import { config } from '../config';
import { getDb, getPool } from '../db/client';
import { attemptRun, DEAD_AFTER_SECONDS, failRun, MAX_ATTEMPTS, WORKER_ID } from './run-executor';
import { getRun, idleQueuedRuns, requeueRun, runningRuns } from './runs.repository';

/** The pg-boss queue of assessment runs. */
export const RUN_QUEUE = 'assessment-run';

/** Runs worked at once in this process, so one trust's long run leaves a worker free for the others. */
const WORKERS = 2;
/**
 * pg-boss's own expiry, a last resort: the heartbeat (run-executor.ts) notices a dead worker within
 * DEAD_AFTER_SECONDS, and the run's attempts are counted on the run, not by pg-boss's retries.
 */
const EXPIRE_SECONDS = 900;
/** How often the sweep looks for runs whose worker is gone. */
const SWEEP_MS = 5_000;
/** A queued run this long untouched is checked for a live job (its job may have been lost). */
const QUEUED_IDLE_SECONDS = 120;
/** A run deferred because its trust already has a run being worked here waits this long before trying again. */
const DEFER_SECONDS = 3;

interface RunJob {
  runId: string;
}

let started: Promise<PgBoss> | undefined;
let sweeper: NodeJS.Timeout | undefined;
/** Trusts with a run being worked in this process: their other runs wait, not the other trusts'. */
const busyTrusts = new Set<string>();

/** Sends a job for a run (a first attempt or a resumption) and records it on the run as queued. */
async function queueRun(
  db: Kysely<Database>,
  boss: PgBoss,
  runId: string,
  note: string | null,
  { startAfterSeconds = 0, fromWorker }: { startAfterSeconds?: number; fromWorker?: string | null } = {},
): Promise<string> {
  const jobId = await boss.send(
    RUN_QUEUE,
    { runId } satisfies RunJob,
    startAfterSeconds ? { startAfter: startAfterSeconds } : {},
  );
  if (!jobId) throw new Error('pg-boss did not accept the job');
  await requeueRun(db, runId, jobId, note, fromWorker);
  return jobId;
}

/** Works one job: the run, unless its trust already has one being worked here (then it waits its turn). */
async function work(db: Kysely<Database>, pool: pg.Pool, boss: PgBoss, runId: string): Promise<void> {
  const run = await getRun(db, runId, null);
  if (!run || run.status === 'succeeded' || run.status === 'failed') return;
  if (busyTrusts.has(run.trustId)) {
    await queueRun(db, boss, runId, null, { startAfterSeconds: DEFER_SECONDS });
    return;
  }
  busyTrusts.add(run.trustId);
  try {
    const outcome = await attemptRun(db, pool, runId);
    if (outcome.next === 'retry')
      await queueRun(db, boss, runId, `Retrying after: ${outcome.reason}`, {
        startAfterSeconds: 2,
        fromWorker: WORKER_ID,
      });
  } finally {
    busyTrusts.delete(run.trustId);
  }
}

/** True when a worker id names a process on this host that is no longer running (or an earlier start of this one). */
function deadOnThisHost(workerId: string | null): boolean {
  const [host, pid, nonce] = (workerId ?? '').split('/');
  if (host !== hostname() || !pid || !nonce) return false;
  if (Number(pid) === process.pid) return workerId !== WORKER_ID;
  try {
    process.kill(Number(pid), 0);
    return false;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'ESRCH';
  }
}

/**
 * Finds runs whose worker is gone — silent for DEAD_AFTER_SECONDS, or a process on this host that has
 * died (so a restart resumes its runs at once) — and resumes each, or fails it after its last attempt.
 * Also re-queues a queued run whose job has been lost.
 */
export async function sweepRuns(db: Kysely<Database>, boss: PgBoss): Promise<void> {
  for (const run of await runningRuns(db, DEAD_AFTER_SECONDS)) {
    if (!run.silent && !deadOnThisHost(run.workerId)) continue;
    const current = await getRun(db, run.id, null);
    // Another sweep (or the worker itself) got there first.
    if (current?.status !== 'running' || current.workerId !== run.workerId) continue;
    if (current.attempts >= MAX_ATTEMPTS) {
      await failRun(
        db,
        run.id,
        `The worker stopped ${current.attempts} times before the run finished. Start a new run.`,
      );
    } else {
      await queueRun(db, boss, run.id, 'Resuming: the worker stopped before the run finished.', {
        fromWorker: current.workerId,
      });
    }
  }
  for (const run of await idleQueuedRuns(db, QUEUED_IDLE_SECONDS)) {
    const job = run.jobId ? await boss.getJobById(RUN_QUEUE, run.jobId, { includeArchive: true }) : null;
    if (job && (job.state === 'created' || job.state === 'retry' || job.state === 'active')) continue;
    await queueRun(db, boss, run.id, null);
  }
}

/**
 * Starts pg-boss in this process the first time it is needed: its schema, the queue, WORKERS workers
 * taking one run each, and the sweep (run once at start, so runs left by a dead worker resume at once).
 */
export function getQueue(): Promise<PgBoss> {
  started ??= (async () => {
    const boss = new PgBoss({ connectionString: config().databaseUrl, max: 4, application_name: 'airtally-queue' });
    boss.on('error', (error) => console.error('pg-boss error', error));
    // The queue's jobs are entry points: they take the process's database handles here and pass them down.
    const db = getDb();
    const pool = getPool();
    await boss.start();
    await boss.createQueue(RUN_QUEUE, { name: RUN_QUEUE, retryLimit: 0, expireInSeconds: EXPIRE_SECONDS });
    for (let i = 0; i < WORKERS; i++) {
      await boss.work<RunJob>(RUN_QUEUE, { batchSize: 1, pollingIntervalSeconds: 1 }, async ([job]) => {
        if (job) await work(db, pool, boss, job.data.runId);
      });
    }
    const sweep = () =>
      sweepRuns(db, boss).catch((error: unknown) => console.error('Assessment run sweep failed', error));
    await sweep();
    sweeper = setInterval(sweep, SWEEP_MS);
    sweeper.unref();
    return boss;
  })().catch((error: unknown) => {
    started = undefined;
    throw error;
  });
  return started;
}

/**
 * Starts the queue when the server starts (see startup.ts), so the sweep resumes runs left by a dead worker
 * without waiting for anyone to ask; while the database cannot be reached it tries again every 10 s.
 */
export function startQueueOnBoot(): void {
  getQueue().catch((error: unknown) => {
    console.error('The assessment queue did not start; trying again in 10 s', error);
    setTimeout(startQueueOnBoot, 10_000).unref();
  });
}

/** Queues a new run; returns the job id. */
export async function enqueueRun(db: Kysely<Database>, runId: string): Promise<string> {
  const boss = await getQueue();
  return queueRun(db, boss, runId, null);
}

/** Stops the queue (tests and shutdown). */
export async function stopQueue(): Promise<void> {
  if (!started) return;
  const boss = await started;
  started = undefined;
  clearInterval(sweeper);
  await boss.stop({ graceful: true, wait: true });
}
