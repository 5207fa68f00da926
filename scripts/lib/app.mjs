// Shared steps of `npm start` and `npm test`: prepare the database, build and serve the app.
import { existsSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, run, step, startChild, startMailFake, waitForPort } from './services.mjs';
import { startPaymentsFakeChild } from '../payments-fake/launch.mjs';

const TSX = join(ROOT, 'node_modules', '.bin', 'tsx');

/** Applies pending migrations and seeds the demo trust (both idempotent). */
export function prepareDatabase(env) {
  step('Applying database migrations');
  run(TSX, ['scripts/db/migrate.ts'], { env: { ...process.env, ...env } });
  step('Seeding the demo trust (skipped when present)');
  run(TSX, ['scripts/db/seed.ts'], { env: { ...process.env, ...env } });
}

function newestMtime(path) {
  if (!existsSync(path)) return 0;
  const stats = statSync(path);
  if (!stats.isDirectory()) return stats.mtimeMs;
  let newest = stats.mtimeMs;
  for (const entry of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, entry)));
  return newest;
}

/** Builds the Astro app into `outDir` unless a build newer than every source already exists. */
export function buildApp(outDir, { force = false } = {}) {
  const stamp = join(outDir, '.build-stamp');
  const sources = ['src', 'db', 'public', 'astro.config.mjs', 'package-lock.json', 'tsconfig.json'].map((p) =>
    join(ROOT, p),
  );
  const newestSource = Math.max(...sources.map(newestMtime));
  if (!force && existsSync(stamp) && statSync(stamp).mtimeMs >= newestSource) {
    step('App build is up to date');
    return;
  }
  step('Building the app (astro build)');
  run(join(ROOT, 'node_modules', '.bin', 'astro'), ['build', '--silent'], {
    env: { ...process.env, AIRTALLY_DIST_DIR: outDir },
  });
  writeFileSync(stamp, new Date().toISOString());
}

/** Serves the built app on 127.0.0.1:port and resolves once it accepts connections. */
export async function serveApp(outDir, port, env) {
  step(`Starting Airtally on http://127.0.0.1:${port}`);
  const child = startChild('app', process.execPath, [join(outDir, 'server', 'entry.mjs')], {
    env: { ...env, HOST: '127.0.0.1', PORT: String(port) },
  });
  await waitForPort(port, 60_000, 'The Airtally server');
  return child;
}

/**
 * Starts everything the app needs around a running Postgres, then the app itself: the payments fake
 * (before the seed, which creates the demo subscription in it), migrations and seed, the mail fake,
 * the build and the server. Returns the environment the app got and the app's child process.
 */
export async function startStack({
  databaseUrl,
  origin,
  port,
  smtpPort,
  mailWebPort,
  paymentsPort,
  dataDir,
  outDir,
  payments,
  extraEnv = {},
  seedEnv = {},
}) {
  const env = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    PUBLIC_ORIGIN: origin,
    APP_URL: origin,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    MAIL_INBOX_URL: `http://127.0.0.1:${mailWebPort}`,
    NODE_ENV: 'production',
    ...extraEnv,
  };
  Object.assign(env, await startPaymentsFakeChild({ port: paymentsPort, appOrigin: origin, dataDir, ...payments }));
  prepareDatabase({ ...env, ...seedEnv });
  startMailFake({ smtpPort, webPort: mailWebPort, dataDir });
  await waitForPort(smtpPort, 20_000, 'The mail fake');
  buildApp(outDir);
  const app = await serveApp(outDir, port, env);
  return { env, app };
}
