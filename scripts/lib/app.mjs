// Shared steps of `npm start` and `npm test`: prepare the database, build and serve the app.
import { existsSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, run, step, startChild, startMailFake, waitForPort } from './services.mjs';
import { dataFolderSecrets } from './secrets.mjs';
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

/** Starts the built server once and resolves when it accepts connections; throws when it exits first. */
async function launchApp(outDir, port, env) {
  const child = startChild('app', process.execPath, [join(outDir, 'server', 'entry.mjs')], {
    env: { ...env, HOST: '127.0.0.1', PORT: String(port) },
  });
  const exited = new Promise((_, reject) =>
    child.once('exit', (code, signal) =>
      reject(new Error(`The Airtally server stopped before it was ready (${signal ?? `exit code ${code}`}).`)),
    ),
  );
  exited.catch(() => undefined);
  await Promise.race([waitForPort(port, 60_000, 'The Airtally server'), exited]);
  return child;
}

/**
 * Serves the built app on 127.0.0.1:port and keeps it running: when the server process dies it is
 * started again (PostgreSQL and the fakes stay up), unless it dies five times within a minute, when
 * `onGiveUp` is called. Its process id is kept in `pidFile` (the crash test kills it from there).
 */
export async function superviseApp(outDir, port, env, { pidFile, onGiveUp }) {
  let stopping = false;
  const crashes = [];
  const watch = (child) => {
    writeFileSync(pidFile, String(child.pid));
    child.once('exit', (code, signal) => {
      if (stopping) return;
      const now = Date.now();
      crashes.push(now);
      while (crashes.length && now - crashes[0] > 60_000) crashes.shift();
      if (crashes.length >= 5) {
        step('The Airtally server keeps stopping; giving up.');
        onGiveUp(code ?? 1);
        return;
      }
      step(`The Airtally server stopped (${signal ?? `exit code ${code}`}); starting it again`);
      setTimeout(() => {
        if (stopping) return;
        launchApp(outDir, port, env).then(watch, (error) => {
          console.error(error.message);
          onGiveUp(1);
        });
      }, 500);
    });
  };
  step(`Starting Airtally on http://127.0.0.1:${port}`);
  watch(await launchApp(outDir, port, env));
  return {
    /** Stops restarting (call before stopping the children). */
    stop() {
      stopping = true;
      rmSync(pidFile, { force: true });
    },
  };
}

/**
 * Starts everything the app needs around a running Postgres, then the app itself: the payments fake
 * (before the seed, which creates the demo subscription in it), migrations and seed, the mail fake,
 * the build and the server (restarted when it dies; `onGiveUp(code)` when it keeps dying). Returns the
 * environment the app got and the app's supervisor.
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
  onGiveUp,
}) {
  const secrets = dataFolderSecrets(dataDir);
  const pidFile = join(dataDir, 'app.pid');
  const env = {
    ...process.env,
    // A secret set by whoever runs this wins; otherwise the data folder's own.
    BETTER_AUTH_SECRET: process.env.BETTER_AUTH_SECRET ?? secrets.authSecret,
    DATABASE_URL: databaseUrl,
    PUBLIC_ORIGIN: origin,
    APP_URL: origin,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    MAIL_INBOX_URL: `http://127.0.0.1:${mailWebPort}`,
    NODE_ENV: 'production',
    APP_DIST_DIR: outDir,
    APP_PID_FILE: pidFile,
    ...extraEnv,
  };
  Object.assign(
    env,
    await startPaymentsFakeChild({
      port: paymentsPort,
      appOrigin: origin,
      dataDir,
      secretKey: secrets.paymentsApiKey,
      webhookSecret: secrets.webhookSecret,
      ...payments,
    }),
  );
  prepareDatabase({ ...env, ...seedEnv });
  startMailFake({ smtpPort, webPort: mailWebPort, dataDir });
  await waitForPort(smtpPort, 20_000, 'The mail fake');
  buildApp(outDir);
  const app = await superviseApp(outDir, port, env, { pidFile, onGiveUp });
  return { env, app };
}
