// The database a backup or restore works on: the one named, or else the local database of `npm start`
// (its cluster started for the occasion when it is not running, and stopped again afterwards).
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { isPortOpen, ROOT, startPostgres } from './services.mjs';

/** The value after `name` on the command line, if any. */
export function option(name) {
  const at = process.argv.indexOf(name);
  return at >= 0 ? process.argv[at + 1] : undefined;
}

/**
 * @param {string | undefined} url a database URL, or undefined for npm start's local database
 * @returns {Promise<{ url: string, label: string, release: () => void }>}
 */
export async function localDatabase(url) {
  if (url) return { url, label: `the database at ${new URL(url).host}${new URL(url).pathname}`, release() {} };
  const dataDir = process.env.AIRTALLY_DATA_DIR ?? join(ROOT, '.data', 'dev');
  const port = Number(process.env.AIRTALLY_PG_PORT ?? 54329);
  if (!existsSync(join(dataDir, 'pgdata', 'PG_VERSION')))
    throw new Error(`There is no local database in ${dataDir}: run npm start first, or give --database-url.`);
  const running = await isPortOpen(port);
  const pg = await startPostgres({ dataDir, port, database: 'airtally' });
  return { url: pg.url, label: `the local database (${dataDir})`, release: () => (running ? undefined : pg.stop()) };
}
