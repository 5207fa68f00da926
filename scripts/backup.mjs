// `npm run backup`: a consistent, compressed copy of the database (pg_dump's custom format, from Debian's
// postgresql package, installed when missing). Restore it with `npm run restore`.
//
//   npm run backup                                   the local database of `npm start` (.data/dev)
//   npm run backup -- --out /path/airtally.dump      where to write it (default .data/backups/)
//   npm run backup -- --database-url postgres://…    another database (DATABASE_URL works too)
import { chmodSync, existsSync, mkdirSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { ensurePostgresBinaries, ROOT, run, step } from './lib/services.mjs';
import { localDatabase, option } from './lib/database-target.mjs';

try {
  const bin = ensurePostgresBinaries();
  const target = await localDatabase(option('--database-url') ?? process.env.DATABASE_URL);
  const stamp = new Date().toISOString().replace(/[:.]/g, '-').slice(0, 19);
  const out = resolve(option('--out') ?? join(ROOT, '.data', 'backups', `airtally-${stamp}.dump`));
  mkdirSync(dirname(out), { recursive: true, mode: 0o700 });
  try {
    step(`Backing up ${target.label} to ${out}`);
    run(join(bin, 'pg_dump'), ['--format=custom', '--no-owner', '--no-privileges', `--file=${out}`, target.url], {
      stdio: ['ignore', 'inherit', 'inherit'],
    });
  } finally {
    target.release();
  }
  // Account data and password hashes: readable by this user only.
  chmodSync(out, 0o600);
  if (!existsSync(out)) throw new Error('pg_dump wrote no file');
  step(`Backup written: ${out} (${(statSync(out).size / 1024 / 1024).toFixed(1)} MB). Copy it off this machine.`);
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
}
