// `npm start`: installs what is missing, starts PostgreSQL and the local fakes on loopback,
// migrates and seeds the demo trust, builds and serves Airtally (restarting the server if it dies).
// Ctrl-C stops everything.
import { join } from 'node:path';
import { ROOT, ensureNodeModules, startPostgres, stopChildren, step } from './lib/services.mjs';
import { startStack } from './lib/app.mjs';

const port = Number(process.env.PORT ?? 4321);
const pgPort = Number(process.env.AIRTALLY_PG_PORT ?? 54329);
const smtpPort = Number(process.env.AIRTALLY_SMTP_PORT ?? 54325);
const mailWebPort = Number(process.env.AIRTALLY_MAIL_WEB_PORT ?? 54326);
const paymentsPort = Number(process.env.AIRTALLY_PAYMENTS_PORT ?? 54327);
const dataDir = process.env.AIRTALLY_DATA_DIR ?? join(ROOT, '.data', 'dev');
const outDir = join(ROOT, 'dist');

let pg;
let app;
let stopping = false;
async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  step('Stopping Airtally, the fakes and PostgreSQL');
  app?.stop();
  await stopChildren();
  pg?.stop();
  process.exit(code);
}
process.on('SIGINT', () => void shutdown(0));
process.on('SIGTERM', () => void shutdown(0));

try {
  ensureNodeModules();
  pg = await startPostgres({ dataDir, port: pgPort, database: 'airtally' });
  const origin = process.env.PUBLIC_ORIGIN ?? `http://127.0.0.1:${port}`;
  ({ app } = await startStack({
    databaseUrl: pg.url,
    origin,
    port,
    smtpPort,
    mailWebPort,
    paymentsPort,
    dataDir,
    outDir,
    payments: { persist: true, retryBaseMs: 2000 },
    // The first start assesses the demo estate so it opens on results.
    seedEnv: { AIRTALLY_SEED_ASSESSMENT: '1' },
    onGiveUp: (code) => void shutdown(code || 1),
  }));
  step(`Ready: ${origin}  (demo inbox: http://127.0.0.1:${mailWebPort})  Ctrl-C stops everything.`);
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  await shutdown(1);
}
