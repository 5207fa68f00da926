// `npm run bench`: starts a private Postgres, the fakes and the app on bench ports, runs every
// scripts/bench/*.bench.ts in turn and merges the JSON object each prints last into bench/results.json.
import { readdirSync, mkdirSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { ROOT, ensureNodeModules, recreateDatabase, startPostgres, step, stopChildren } from './lib/services.mjs';
import { startStack } from './lib/app.mjs';

const port = Number(process.env.AIRTALLY_BENCH_PORT ?? 4398);
const pgPort = Number(process.env.AIRTALLY_BENCH_PG_PORT ?? 54349);
const smtpPort = Number(process.env.AIRTALLY_BENCH_SMTP_PORT ?? 54345);
const mailWebPort = Number(process.env.AIRTALLY_BENCH_MAIL_WEB_PORT ?? 54346);
const paymentsPort = Number(process.env.AIRTALLY_BENCH_PAYMENTS_PORT ?? 54347);
const dataDir = process.env.AIRTALLY_BENCH_DATA_DIR ?? join(ROOT, '.data', 'bench');
const outDir = join(ROOT, '.data', 'bench-dist');
const only = process.argv.slice(2);

let pg;
let app;
async function finish(code) {
  app?.stop();
  await stopChildren();
  pg?.stop();
  process.exit(code);
}
process.on('SIGINT', () => void finish(130));

try {
  ensureNodeModules();
  pg = await startPostgres({ dataDir, port: pgPort, database: 'postgres' });
  recreateDatabase(pg, 'airtally_bench');
  const origin = `http://127.0.0.1:${port}`;
  let env;
  ({ env, app } = await startStack({
    databaseUrl: pg.url.replace(/\/postgres$/, '/airtally_bench'),
    origin,
    port,
    smtpPort,
    mailWebPort,
    paymentsPort,
    dataDir,
    outDir,
    payments: { persist: false, retryBaseMs: 1000 },
    // The app only queues runs here: the batch benchmark starts its own `npm run worker` processes.
    extraEnv: { ASSESSMENT_APP_WORKERS: '0' },
    onGiveUp: (code) => void finish(code || 1),
  }));

  const resultsFile = join(ROOT, 'bench', 'results.json');
  mkdirSync(join(ROOT, 'bench'), { recursive: true });
  const results = existsSync(resultsFile) ? JSON.parse(readFileSync(resultsFile, 'utf8')) : {};
  const benches = readdirSync(join(ROOT, 'scripts', 'bench'))
    .filter((f) => f.endsWith('.bench.ts'))
    .filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
    .sort();
  let failed = false;
  for (const file of benches) {
    step(`Benchmark ${file}`);
    const run = spawnSync(join(ROOT, 'node_modules', '.bin', 'tsx'), [join('scripts', 'bench', file)], {
      cwd: ROOT,
      env: { ...env, BENCH_DIST_DIR: outDir },
      stdio: ['ignore', 'pipe', 'inherit'],
      maxBuffer: 64 * 1024 * 1024,
    });
    const out = run.stdout.toString();
    process.stdout.write(out);
    const last = out
      .trim()
      .split('\n')
      .filter((l) => l.trim().startsWith('{'))
      .pop();
    if (run.status !== 0 || !last) {
      failed = true;
      console.error(`${file} failed (exit ${run.status})`);
      continue;
    }
    Object.assign(results, JSON.parse(last));
  }
  results.measured_at = new Date().toISOString();
  writeFileSync(resultsFile, `${JSON.stringify(results, null, 2)}\n`);
  step(`Figures written to bench/results.json`);
  console.log(JSON.stringify(results, null, 2));
  await finish(failed ? 1 : 0);
} catch (error) {
  console.error(error instanceof Error ? error.stack : error);
  await finish(1);
}
