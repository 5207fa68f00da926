// `npm test`: the same bootstrapping as `npm start` on its own cluster, ports and database,
// then every vitest project (unit, integration against the real services, browser tests).
import { join } from 'node:path';
import { existsSync, readFileSync, rmSync } from 'node:fs';
import {
  ROOT,
  ensureChromium,
  ensureNodeModules,
  recreateDatabase,
  startChild,
  startPostgres,
  step,
  stopChildren,
} from './lib/services.mjs';
import { startStack } from './lib/app.mjs';

const port = Number(process.env.AIRTALLY_TEST_PORT ?? 4399);
const pgPort = Number(process.env.AIRTALLY_TEST_PG_PORT ?? 54339);
const smtpPort = Number(process.env.AIRTALLY_TEST_SMTP_PORT ?? 54335);
const mailWebPort = Number(process.env.AIRTALLY_TEST_MAIL_WEB_PORT ?? 54336);
const paymentsPort = Number(process.env.AIRTALLY_TEST_PAYMENTS_PORT ?? 54337);
const dataDir = process.env.AIRTALLY_TEST_DATA_DIR ?? join(ROOT, '.data', 'test');
const outDir = process.env.AIRTALLY_TEST_DIST_DIR ?? join(ROOT, '.data', 'test-dist');
const vitestArgs = process.argv.slice(2);

let pg;
let app;
async function finish(code) {
  app?.stop();
  await stopChildren();
  pg?.stop();
  process.exit(code);
}
process.on('SIGINT', () => void finish(130));
process.on('SIGTERM', () => void finish(143));

try {
  ensureNodeModules();
  ensureChromium();
  process.env.AIRTALLY_PG_FSYNC = 'off';
  pg = await startPostgres({ dataDir, port: pgPort, database: 'postgres' });
  const database = 'airtally_test';
  recreateDatabase(pg, database);
  const databaseUrl = pg.url.replace(/\/postgres$/, `/${database}`);
  const origin = `http://127.0.0.1:${port}`;
  let env;
  ({ env, app } = await startStack({
    databaseUrl,
    origin,
    port,
    smtpPort,
    mailWebPort,
    paymentsPort,
    dataDir,
    outDir,
    payments: { persist: false, retryBaseMs: 300 },
    extraEnv: {
      TEST_ADMIN_DATABASE_URL: pg.adminUrl,
      // Every test signs in from loopback; the per-account brute-force guard stays as in production.
      AUTH_SIGN_IN_PER_MINUTE_PER_ADDRESS: '5000',
    },
    onGiveUp: (code) => void finish(code || 1),
  }));

  step('Running vitest (unit, integration, browser)');
  const resultsFile = join(dataDir, 'vitest-results.json');
  rmSync(resultsFile, { force: true });
  // Asynchronous, so Ctrl-C and SIGTERM still reach our handler and stop the services.
  const vitest = startChild(
    'vitest',
    join(ROOT, 'node_modules', '.bin', 'vitest'),
    ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${resultsFile}`, ...vitestArgs],
    { env },
  );
  let code = await new Promise((resolveExit) => vitest.on('exit', (status) => resolveExit(status ?? 1)));
  if (existsSync(resultsFile)) {
    const summary = JSON.parse(readFileSync(resultsFile, 'utf8'));
    const passed = summary.numPassedTests ?? 0;
    const failed = (summary.numFailedTests ?? 0) || (summary.numFailedTestSuites ?? 0);
    if (passed === 0) code = code || 1;
    console.log(`\n${passed} passed, ${failed} failed`);
  } else {
    console.log('\n0 passed, 1 failed');
    code = code || 1;
  }
  await finish(code);
} catch (error) {
  console.error(error instanceof Error ? error.stack : error);
  await finish(1);
}
