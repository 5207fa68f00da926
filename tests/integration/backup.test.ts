// `npm run backup` and `npm run restore` (issue 17, item 7): back up the test database, restore it into an
// empty one, and find every trust, room, run and audit event there.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Kysely } from 'kysely';
import { afterAll, describe, expect, it } from 'vitest';
import type { Database } from '../../db/database';
import { createScratchDatabase, testDb } from '../helpers/db';

const source = testDb();
const folder = mkdtempSync(join(tmpdir(), 'airtally-backup-test-'));
let scratch: Awaited<ReturnType<typeof createScratchDatabase>> | undefined;
afterAll(async () => {
  await scratch?.drop();
  await source.destroy();
  rmSync(folder, { recursive: true, force: true });
});

const npmScript = (script: string, args: string[]) =>
  spawnSync(process.execPath, [join('scripts', script), ...args], {
    cwd: process.cwd(),
    encoding: 'utf8',
    timeout: 180_000,
  });

async function ids(db: Kysely<Database>) {
  const of = async (table: 'trusts' | 'rooms' | 'assessment_runs' | 'audit_events') =>
    new Set((await db.selectFrom(table).select('id').execute()).map((r) => String(r.id)));
  return {
    trusts: await of('trusts'),
    rooms: await of('rooms'),
    runs: await of('assessment_runs'),
    audit: await of('audit_events'),
  };
}

describe('backup and restore', () => {
  it('restores a backup of the test database into an empty one with every trust, room, run and audit event', async () => {
    // Runs of a trust of its own, whatever ran before this file.
    const trustId = `backup-test-${Date.now()}`;
    await source.insertInto('trusts').values({ id: trustId, name: 'Backup Test Trust', slug: trustId }).execute();
    await source
      .insertInto('assessment_runs')
      .values([
        { trust_id: trustId, scope: 'trust', status: 'failed', error: 'Backup test: a failed run.' },
        { trust_id: trustId, scope: 'trust', status: 'succeeded', rooms_total: 0 },
      ])
      .execute();
    const before = await ids(source);
    expect(before.runs.size).toBeGreaterThan(1);
    expect(before.trusts.size).toBeGreaterThan(0);
    expect(before.rooms.size).toBeGreaterThan(0);
    expect(before.audit.size).toBeGreaterThan(0);
    const file = join(folder, 'airtally.dump');
    const backup = npmScript('backup.mjs', ['--database-url', process.env.DATABASE_URL ?? '', '--out', file]);
    expect(backup.status, backup.stderr).toBe(0);
    expect(statSync(file).mode & 0o777).toBe(0o600);

    scratch = await createScratchDatabase('airtally_restore_test');
    const restore = npmScript('restore.mjs', [file, '--database-url', scratch.url]);
    expect(restore.status, restore.stderr).toBe(0);
    expect(restore.stdout).toMatch(/Restored \d+ trusts, \d+ rooms/);

    const restored = await ids(scratch.db);
    for (const key of ['trusts', 'rooms', 'runs', 'audit'] as const) {
      const missing = [...before[key]].filter((id) => !restored[key].has(id));
      expect(missing, `${key} missing from the restore`).toEqual([]);
    }
    // The restored database is a working one: the demo trust's rooms keep their school.
    const room = await scratch.db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .select('schools.trust_id')
      .where('schools.trust_id', '=', 'demo-trust')
      .executeTakeFirst();
    expect(room?.trust_id).toBe('demo-trust');
  }, 240_000);

  it('refuses to restore into a database that is not empty, and changes nothing there', async () => {
    if (!scratch) throw new Error('the restore above did not run');
    const file = join(folder, 'airtally.dump');
    expect(existsSync(file)).toBe(true);
    const before = await ids(scratch.db);
    const again = npmScript('restore.mjs', [file, '--database-url', scratch.url]);
    expect(again.status).not.toBe(0);
    expect(again.stderr).toMatch(/not empty/);
    expect(await ids(scratch.db)).toEqual(before);
  }, 120_000);

  it('refuses a file that is missing, with a message', () => {
    const result = npmScript('restore.mjs', [
      join(folder, 'no-such.dump'),
      '--database-url',
      process.env.DATABASE_URL ?? '',
    ]);
    expect(result.status).not.toBe(0);
    expect(result.stderr).toMatch(/Name the backup file/);
  });
});
