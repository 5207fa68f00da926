import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateDownToZero, migrateToLatest } from '../../db/migrator';
import { createScratchDatabase } from '../helpers/db';

describe('database migrations', () => {
  let scratch: Awaited<ReturnType<typeof createScratchDatabase>>;
  beforeAll(async () => {
    scratch = await createScratchDatabase('airtally_migrations_check');
  });
  afterAll(async () => {
    await scratch.drop();
  });

  const userTables = async () => {
    const { rows } = await sql<{ table_name: string }>`
      SELECT table_name FROM information_schema.tables
      WHERE table_schema = 'public' AND table_name NOT LIKE 'kysely_%' ORDER BY table_name`.execute(scratch.db);
    return rows.map((r) => r.table_name);
  };

  it('creates the estate tables on an empty database', async () => {
    await migrateToLatest(scratch.db);
    const tables = await userTables();
    for (const table of ['trusts', 'schools', 'blocks', 'rooms', 'audit_events']) expect(tables).toContain(table);
  });

  it('reverts every migration, leaving no table behind', async () => {
    await migrateDownToZero(scratch.db);
    expect(await userTables()).toEqual([]);
  });

  it('applies again after a full revert', async () => {
    await migrateToLatest(scratch.db);
    expect(await userTables()).toContain('rooms');
  });
});
