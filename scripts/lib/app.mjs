// Shared steps of `npm start` and `npm test`: prepare the database, build and serve the app.
import { existsSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, run, step, startChild, waitForPort } from './services.mjs';

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
  const sources = ['src', 'db', 'public', 'astro.config.mjs', 'package-lock.json', 'tsconfig.json'].map((p) => join(ROOT, p));
  const newestSource = Math.max(...sources.map(newestMtime));
  if (!force && existsSync(stamp) && statSync(stamp).mtimeMs >= newestSource) {
    step('App build is up to date');
    return;
  }
  step('Building the app (astro build)');
  run(join(ROOT, 'node_modules', '.bin', 'astro'), ['build', '--silent'], { env: { ...process.env, AIRTALLY_DIST_DIR: outDir } });
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
