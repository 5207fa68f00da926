// `npm run restore -- <file>`: restores a backup made by `npm run backup` into an empty database, in one
// transaction (all or nothing), then counts what it restored.
//
//   npm run restore -- backup.dump                             into the local database of `npm start` (.data/dev)
//   npm run restore -- backup.dump --database-url postgres://…  into another (empty) database
//   npm run restore -- backup.dump --replace                   drop and recreate the target first
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { ensurePostgresBinaries, run, step } from './lib/services.mjs';
import { localDatabase, option } from './lib/database-target.mjs';

const psql = (bin, url, query) => {
  const result = spawnSync(join(bin, 'psql'), [url, '-tAqc', query], { encoding: 'utf8' });
  if (result.status !== 0) throw new Error(result.stderr.trim() || `psql exited with ${result.status}`);
  return result.stdout.trim();
};

try {
  const args = process.argv.slice(2);
  const file = args.find((a, i) => !a.startsWith('--') && args[i - 1] !== '--database-url');
  if (!file || !existsSync(file)) throw new Error('Name the backup file to restore: npm run restore -- <file>');
  const bin = ensurePostgresBinaries();
  const target = await localDatabase(option('--database-url') ?? process.env.DATABASE_URL);
  try {
    if (process.argv.includes('--replace')) {
      const name = decodeURIComponent(new URL(target.url).pathname.slice(1));
      const maintenance = new URL(target.url);
      maintenance.pathname = '/postgres';
      step(`Dropping and recreating ${target.label}`);
      psql(bin, maintenance.href, `DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
      psql(bin, maintenance.href, `CREATE DATABASE "${name}"`);
    }
    const tables = Number(
      psql(
        bin,
        target.url,
        "SELECT count(*) FROM pg_tables WHERE schemaname NOT IN ('pg_catalog', 'information_schema')",
      ),
    );
    if (tables > 0)
      throw new Error(
        `${target.label} is not empty (${tables} tables). Restore into an empty database (createdb …), or pass --replace to drop and recreate it.`,
      );
    step(`Restoring ${resolve(file)} into ${target.label}`);
    run(
      join(bin, 'pg_restore'),
      [
        '--no-owner',
        '--no-privileges',
        '--exit-on-error',
        '--single-transaction',
        `--dbname=${target.url}`,
        resolve(file),
      ],
      { stdio: ['ignore', 'inherit', 'inherit'] },
    );
    const count = (table) => psql(bin, target.url, `SELECT count(*) FROM ${table}`);
    step(
      `Restored ${count('trusts')} trusts, ${count('rooms')} rooms, ${count('assessment_runs')} assessment runs and ${count('audit_events')} audit events.`,
    );
  } finally {
    target.release();
  }
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
}
