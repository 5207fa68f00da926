// `npm run worker`: an assessment worker process. Run any number of them, on any machines that reach the same
// PostgreSQL (DATABASE_URL): each takes chunks of assessment runs from the pg-boss queue
// (ASSESSMENT_WORKER_CONCURRENCY at a time, 2 by default) and sweeps for chunks whose worker has died.
// SIGTERM or Ctrl-C lets the chunks in hand finish, then stops. See docker-free-setup.md.
import { drainWorkers, startWorkers, stopQueue } from '../src/lib/server/assessments/queue';
import { WORKER_ID } from '../src/lib/server/assessments/run-executor';
import { config } from '../src/lib/server/config';
import { getPool } from '../src/lib/server/db/client';

const { workerConcurrency } = config().assessments;
let stopping = false;

async function stop(signal: string): Promise<void> {
  if (stopping) return;
  stopping = true;
  console.log(`Assessment worker ${WORKER_ID}: ${signal}, finishing the chunks in hand`);
  await drainWorkers();
  await stopQueue();
  await getPool().end();
  process.exit(0);
}
process.on('SIGTERM', () => void stop('SIGTERM'));
process.on('SIGINT', () => void stop('SIGINT'));

try {
  await startWorkers(workerConcurrency);
  console.log(
    `Assessment worker ${WORKER_ID}: ${workerConcurrency} at a time, queue on ${new URL(config().databaseUrl).host}`,
  );
} catch (error) {
  console.error('The assessment worker could not start:', error instanceof Error ? error.message : error);
  process.exit(1);
}
