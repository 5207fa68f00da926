/**
 * The assessment queue on pg-boss. A run is split into chunks (chunks.repository.ts); each chunk gets one job in the
 * queue, and any worker on any machine connected to the same database takes jobs: the web app's own workers
 * (ASSESSMENT_APP_WORKERS, 2 by default) and `npm run worker` processes. A job names only its run: the worker claims
 * whichever chunk of it is free, so a lost or repeated job never loses or doubles work. Jobs of several runs
 * interleave (chunk n of every run has priority −n), so a national run does not hold up a small trust's run.
 *
 * The sweep (every 5 s in every process with the queue) hands back chunks whose worker has gone — silent for
 * DEAD_AFTER_SECONDS, or a process on this host that no longer exists — and sends a job for each, fails a run
 * whose chunk has failed MAX_ATTEMPTS times, finishes runs whose last worker stopped before switching them
 * current, and sends jobs for pending chunks that have none waiting (a job fetched by a worker that died before it
 * claimed a chunk is lost with it; a worker finishing a chunk makes the same check for its run at once).
 */
import { hostname } from 'node:os';
import { CompiledQuery, type Kysely, sql } from 'kysely';
import PgBoss from 'pg-boss';
import pg from 'pg';
import type { Database } from '../../../../db/database';
import { config } from '../config';
import { getDb, getPool } from '../db/client';
import { reclaimChunk, runningChunks } from './chunks.repository';
import {
  DEAD_AFTER_SECONDS,
  failRun,
  finishRun,
  MAX_ATTEMPTS,
  WORKER_ID,
  type WorkOptions,
  workNextChunk,
} from './run-executor';
import { runsToFinish } from './runs.repository';

/** The pg-boss queue of assessment chunks. */
export const CHUNK_QUEUE = 'assessment-chunk';

/**
 * pg-boss's own expiry of a job, a last resort: a chunk takes seconds, and the sweep hands back a dead worker's chunk
 * after DEAD_AFTER_SECONDS (pg-boss would wait for its expiry and the next maintenance, minutes).
 */
const EXPIRE_SECONDS = 300;
/** How often the sweep looks for chunks whose worker is gone. */
const SWEEP_MS = 5_000;
/** A running run with every chunk done this long is finished by the sweep (its last worker stopped first). */
const FINISH_AFTER_SECONDS = 10;
/**
 * How long a worker with nothing to do waits before asking again, unless a notification on JOBS_CHANNEL wakes it
 * first (it always does while this process listens; polling covers a lost listening connection).
 */
const IDLE_POLL_MS = 500;
/**
 * The channel on which sendChunkJobs tells every worker process that jobs are waiting. PostgreSQL delivers the
 * notification when the jobs' transaction commits, so no worker wakes for jobs it cannot see yet.
 */
export const JOBS_CHANNEL = 'airtally_assessment_jobs';
/** How long this process waits before listening again after its listening connection failed. */
const RELISTEN_MS = 5_000;

interface ChunkJob {
  runId: string;
}

let started: Promise<PgBoss> | undefined;
let sweeper: NodeJS.Timeout | undefined;
const loops: { stop: () => void; wake: () => void; done: Promise<void> }[] = [];
/** The connection listening on JOBS_CHANNEL while this process has workers. */
let listener: pg.Client | undefined;

/**
 * Sends `count` jobs for a run (its chunks, or chunks handed back) through `db`: inside the caller's transaction when
 * `db` is one, so a run and its jobs are committed together.
 */
export async function sendChunkJobs(
  db: Kysely<Database>,
  runId: string,
  count: number,
  { startAfterSeconds = 0, firstPriority = 0 }: { startAfterSeconds?: number; firstPriority?: number } = {},
): Promise<void> {
  if (count <= 0) return;
  const boss = await getQueue();
  const jobs = Array.from({ length: count }, (_, i) => ({
    name: CHUNK_QUEUE,
    data: { runId } satisfies ChunkJob,
    priority: firstPriority - i,
    ...(startAfterSeconds ? { startAfter: new Date(Date.now() + startAfterSeconds * 1000).toISOString() } : {}),
  }));
  // pg-boss writes through our handle (the caller's transaction, if it is one).
  const through = {
    executeSql: async (text: string, values: unknown[]) => {
      const result = await db.executeQuery(CompiledQuery.raw(text, values));
      return { rows: result.rows };
    },
  };
  await boss.insert(jobs, { db: through });
  // Idle workers in every process wake at once (at the commit, when `db` is a transaction), not at their next poll.
  await sql`SELECT pg_notify(${JOBS_CHANNEL}, ${runId})`.execute(db);
}

/**
 * Wakes this process's idle workers whenever jobs are sent from any process: LISTEN on a connection of its own. When
 * that connection fails the workers still poll every IDLE_POLL_MS, and it listens again after RELISTEN_MS. (Through a
 * pooler in transaction mode, notifications do not arrive: the workers then start a run's chunks at their next poll.)
 */
function listenForJobs(): void {
  if (listener || loops.length === 0) return;
  const client = new pg.Client({ connectionString: config().databaseUrl, application_name: 'airtally-queue-listen' });
  listener = client;
  let retrying = false;
  const retry = (error?: unknown) => {
    if (listener !== client || retrying) return;
    retrying = true;
    listener = undefined;
    if (error) console.error('Listening for assessment jobs failed; idle workers poll until it listens again', error);
    client.end().catch(() => undefined);
    setTimeout(listenForJobs, RELISTEN_MS).unref();
  };
  client.on('notification', () => {
    for (const loop of loops) loop.wake();
  });
  client.on('error', retry);
  client.on('end', () => retry());
  client
    .connect()
    .then(() => client.query(`LISTEN ${JOBS_CHANNEL}`))
    .catch(retry);
}

/** Stops listening (the workers have stopped). */
async function stopListening(): Promise<void> {
  const client = listener;
  listener = undefined;
  await client?.end().catch(() => undefined);
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

/** One pass of the sweep (see the module comment). */
export async function sweepRuns(db: Kysely<Database>): Promise<void> {
  for (const chunk of await runningChunks(db, DEAD_AFTER_SECONDS)) {
    if (!chunk.silent && !deadOnThisHost(chunk.workerId)) continue;
    if (chunk.attempts >= MAX_ATTEMPTS) {
      await failRun(
        db,
        chunk.runId,
        `A worker stopped ${chunk.attempts} times while assessing the same part of this run. Start a new run.`,
      );
      continue;
    }
    if (await reclaimChunk(db, chunk.runId, chunk.chunkNo, chunk.workerId)) await sendChunkJobs(db, chunk.runId, 1);
  }
  for (const runId of await runsToFinish(db, FINISH_AFTER_SECONDS)) await finishRun(db, runId);
  await sendMissingJobs(db, null);
}

/**
 * Sends jobs for the pending chunks of unfinished runs (or of `runId`) that were queued (have had jobs) but have none
 * waiting now: each such run gets one job per pending chunk. Extra jobs cost a look and nothing more (a job finding no
 * pending chunk completes at once). Runs worked in one process without the queue (the demo seed) are left alone.
 */
export async function sendMissingJobs(db: Kysely<Database>, runId: string | null): Promise<void> {
  const ofRun = runId === null ? sql`TRUE` : sql`c.run_id = ${runId}::uuid`;
  const { rows } = await sql<{ run_id: string; pending: number }>`
    WITH pending AS (
      SELECT c.run_id, count(*)::int AS pending
      FROM assessment_run_chunks c JOIN assessment_runs r ON r.id = c.run_id
      WHERE c.status = 'pending' AND r.status IN ('queued', 'running') AND ${ofRun}
      GROUP BY c.run_id
    ), jobs AS (
      SELECT j.data->>'runId' AS run_id, bool_or(j.state IN ('created', 'retry')) AS waiting
      FROM pgboss.job j
      WHERE j.name = ${CHUNK_QUEUE} AND j.data->>'runId' IN (SELECT run_id::text FROM pending)
      GROUP BY 1
    )
    SELECT p.run_id, p.pending FROM pending p JOIN jobs ON jobs.run_id = p.run_id::text WHERE NOT jobs.waiting`.execute(
    db,
  );
  for (const r of rows) await sendChunkJobs(db, r.run_id, r.pending);
}

/**
 * Starts pg-boss in this process the first time it is needed: its schema, the queue and the sweep. The first sweep runs
 * as soon as the queue is up (so chunks left by a dead worker on this host go back at once); it is not awaited here,
 * because the sweep itself sends jobs through this queue.
 */
export function getQueue(): Promise<PgBoss> {
  if (started) return started;
  const starting = (async () => {
    const boss = new PgBoss({ connectionString: config().databaseUrl, max: 4, application_name: 'airtally-queue' });
    boss.on('error', (error) => console.error('pg-boss error', error));
    await boss.start();
    await boss.createQueue(CHUNK_QUEUE, { name: CHUNK_QUEUE, retryLimit: 0, expireInSeconds: EXPIRE_SECONDS });
    return boss;
  })();
  started = starting;
  starting.then(
    () => {
      if (started !== starting) return;
      // The sweep is an entry point: it takes the process's database handle here and passes it down.
      const db = getDb();
      let sweeping = false;
      const sweep = async () => {
        if (sweeping) return; // the last pass is still going
        sweeping = true;
        await sweepRuns(db).catch((error: unknown) => console.error('Assessment run sweep failed', error));
        sweeping = false;
      };
      void sweep();
      sweeper = setInterval(sweep, SWEEP_MS);
      sweeper.unref();
    },
    () => {
      if (started === starting) started = undefined;
    },
  );
  return starting;
}

/**
 * One worker: takes a job, works a chunk of its run, completes the job, and at once asks for the next; waits
 * IDLE_POLL_MS only when the queue is empty. (pg-boss's own work() loop waits its polling interval after every job,
 * which would cap a worker at two chunks a second.)
 */
function startLoop(
  db: Kysely<Database>,
  pool: pg.Pool,
  boss: PgBoss,
  options: WorkOptions,
): { stop: () => void; wake: () => void; done: Promise<void> } {
  let stopping = false;
  let wake: (() => void) | null = null;
  const done = (async () => {
    while (!stopping) {
      let job: PgBoss.Job<ChunkJob> | undefined;
      try {
        [job] = (await boss.fetch<ChunkJob>(CHUNK_QUEUE, { batchSize: 1 })) ?? [];
      } catch (error) {
        console.error('Fetching an assessment job failed', error);
      }
      if (!job) {
        await new Promise<void>((resolve) => {
          wake = resolve;
          setTimeout(resolve, IDLE_POLL_MS).unref();
        });
        wake = null;
        continue;
      }
      try {
        const outcome = await workNextChunk(db, pool, job.data.runId, options);
        if (outcome === 'retry') await sendChunkJobs(db, job.data.runId, 1, { startAfterSeconds: 2 });
        else if (outcome === 'done') await sendMissingJobs(db, job.data.runId);
        await boss.complete(CHUNK_QUEUE, job.id);
      } catch (error) {
        console.error('An assessment job failed', error);
        await boss.fail(CHUNK_QUEUE, job.id, { message: String(error) }).catch(() => undefined);
      }
    }
  })();
  return {
    stop: () => {
      stopping = true;
      wake?.();
    },
    wake: () => wake?.(),
    done,
  };
}

/**
 * Starts `count` workers in this process (each works one chunk at a time; two overlap reading, assessing and
 * writing). `options` reach every chunk (tests stall a worker with them).
 */
export async function startWorkers(count: number, options: WorkOptions = {}): Promise<void> {
  const boss = await getQueue();
  // The workers are entry points: they take the process's database handles here and pass them down.
  const db = getDb();
  const pool = getPool();
  for (let i = 0; i < count; i++) loops.push(startLoop(db, pool, boss, options));
  listenForJobs();
}

/**
 * Starts the queue when the server starts (see startup.ts), so the sweep hands back work left by a dead worker
 * without waiting for anyone to ask, with the app's own workers; while the database cannot be reached it tries again
 * every 10 s.
 */
export function startQueueOnBoot(): void {
  startWorkers(config().assessments.appWorkers).catch((error: unknown) => {
    console.error('The assessment queue did not start; trying again in 10 s', error);
    setTimeout(startQueueOnBoot, 10_000).unref();
  });
}

/** Stops this process's workers after their current chunk, then the queue (shutdown and tests). */
export async function stopQueue(): Promise<void> {
  await drainWorkers();
  if (!started) return;
  const boss = await started;
  started = undefined;
  clearInterval(sweeper);
  await boss.stop({ graceful: true, wait: true });
}

/** Waits for this process's workers to finish their current chunk (graceful shutdown of a worker process). */
export async function drainWorkers(): Promise<void> {
  const current = loops.splice(0);
  for (const loop of current) loop.stop();
  await stopListening();
  await Promise.all(current.map((l) => l.done));
}
