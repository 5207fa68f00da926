// `npm start`: installs what is missing, starts PostgreSQL and the local fakes on loopback,
// migrates and seeds the demo trust, builds and serves Airtally. Ctrl-C stops everything.
import { join } from 'node:path';
import { ROOT, ensureNodeModules, startPostgres, startMailFake, stopChildren, step, waitForPort } from './lib/services.mjs';
import { buildApp, prepareDatabase, serveApp } from './lib/app.mjs';
import { startPaymentsFakeChild } from './payments-fake/launch.mjs';

const port = Number(process.env.PORT ?? 4321);
const pgPort = Number(process.env.AIRTALLY_PG_PORT ?? 54329);
const smtpPort = Number(process.env.AIRTALLY_SMTP_PORT ?? 54325);
const mailWebPort = Number(process.env.AIRTALLY_MAIL_WEB_PORT ?? 54326);
const paymentsPort = Number(process.env.AIRTALLY_PAYMENTS_PORT ?? 54327);
const dataDir = process.env.AIRTALLY_DATA_DIR ?? join(ROOT, '.data', 'dev');
const outDir = join(ROOT, 'dist');

let pg;
let stopping = false;
async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  step('Stopping Airtally, the fakes and PostgreSQL');
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
  const env = {
    ...process.env,
    DATABASE_URL: pg.url,
    PUBLIC_ORIGIN: origin,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    MAIL_INBOX_URL: `http://127.0.0.1:${mailWebPort}`,
    NODE_ENV: 'production',
  };
  // Payments fake before the seed: the demo trust's subscription is created in it through the SDK.
  Object.assign(env, await startPaymentsFakeChild({ port: paymentsPort, appOrigin: origin, dataDir, persist: true, retryBaseMs: 2000 }));
  prepareDatabase({ ...env, AIRTALLY_SEED_ASSESSMENT: '1' });
  startMailFake({ smtpPort, webPort: mailWebPort, dataDir });
  await waitForPort(smtpPort, 20_000, 'The mail fake');
  buildApp(outDir);
  const app = await serveApp(outDir, port, env);
  step(`Ready: ${origin}  (demo inbox: http://127.0.0.1:${mailWebPort})  Ctrl-C stops everything.`);
  app.on('exit', (code) => void shutdown(code ?? 1));
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  await shutdown(1);
}
