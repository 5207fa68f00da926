// A worker process for the crash tests: the queue's own workers (as `npm run worker` starts them), except that each
// chunk pauses for CHUNK_PAUSE_MS before its commit, so a test can kill the process while it holds a chunk.
// Usage: node --import tsx assessments-crash-worker.ts (DATABASE_URL and CHUNK_PAUSE_MS from the environment).
import { startWorkers } from '../../src/lib/server/assessments/queue';
import { WORKER_ID } from '../../src/lib/server/assessments/run-executor';

const pauseMs = Number(process.env.CHUNK_PAUSE_MS ?? 0);
await startWorkers(1, { beforeCommit: () => new Promise((resolve) => setTimeout(resolve, pauseMs)) });
console.log(`ready ${WORKER_ID}`);
