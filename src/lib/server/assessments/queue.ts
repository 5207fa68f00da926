import PgBoss from 'pg-boss';
import { config } from '../config';
import { attemptRun } from './run-executor';

/** The pg-boss queue of assessment runs. */
export const RUN_QUEUE = 'assessment-run';

/** A run of a whole trust takes seconds; an attempt still active after this is taken as a dead worker. */
const EXPIRE_SECONDS = 600;

interface RunJob {
  runId: string;
}

let started: Promise<{ boss: PgBoss; workerId: string }> | undefined;

/**
 * Starts pg-boss in this process the first time it is needed: it creates its own schema, the queue, and
 * one worker that runs one assessment at a time (runs use both cores' worth of Postgres already).
 * A job whose worker died is failed by pg-boss's expiry and retried; the retry resumes the run.
 */
export function getQueue(): Promise<{ boss: PgBoss; workerId: string }> {
  started ??= (async () => {
    const boss = new PgBoss({ connectionString: config().databaseUrl, max: 4, application_name: 'airtally-queue' });
    boss.on('error', (error) => console.error('pg-boss error', error));
    await boss.start();
    await boss.createQueue(RUN_QUEUE, {
      name: RUN_QUEUE,
      retryLimit: 2,
      retryDelay: 2,
      expireInSeconds: EXPIRE_SECONDS,
    });
    const workerId = await boss.work<RunJob>(
      RUN_QUEUE,
      { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 },
      async ([job]) => {
        if (job) await attemptRun(job.data.runId, { retryCount: job.retryCount, retryLimit: job.retryLimit });
      },
    );
    return { boss, workerId };
  })().catch((error: unknown) => {
    started = undefined;
    throw error;
  });
  return started;
}

/** Starts the queue when the server starts (see startup.ts); a failure is logged and retried on first use. */
export function startQueueOnBoot(): void {
  getQueue().catch((error: unknown) => console.error('The assessment queue did not start', error));
}

/** Queues a run and wakes the worker; returns the job id. */
export async function enqueueRun(runId: string): Promise<string> {
  const { boss, workerId } = await getQueue();
  const jobId = await boss.send(RUN_QUEUE, { runId } satisfies RunJob, { singletonKey: runId });
  if (!jobId) throw new Error('pg-boss did not accept the job');
  boss.notifyWorker(workerId);
  return jobId;
}

/** The state pg-boss holds for a job, or null when it has been archived away or never existed. */
export async function jobState(jobId: string): Promise<string | null> {
  const { boss } = await getQueue();
  const job = await boss.getJobById(RUN_QUEUE, jobId, { includeArchive: true });
  return job?.state ?? null;
}

/** Stops the queue (tests and shutdown). */
export async function stopQueue(): Promise<void> {
  if (!started) return;
  const { boss } = await started;
  started = undefined;
  await boss.stop({ graceful: true, wait: true });
}
