// A worker process for the crash test: works one run slowly (a pause after each chunk) so the test can
// kill it with SIGKILL midway, as a crashed server would die. Usage: tsx assessments-crash-worker.ts <runId>
import { executeRun } from '../../src/lib/server/assessments/run-executor';
import { getDb, getPool } from '../../src/lib/server/db/client';

const runId = process.argv[2]!;
await executeRun(getDb(), getPool(), runId, {
  chunkSize: 25,
  afterChunk: () => new Promise((resolve) => setTimeout(resolve, 300)),
});
process.exit(0);
