import type { Kysely } from 'kysely';

// Frozen migration: an import's preview keeps the schools the file creates (listed once, with where their phase and
// region came from) and the rejected rows as the file held them (gzip'd JSON), for the rejected-rows workbook.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable('register_imports')
    .addColumn('new_schools', 'jsonb')
    .addColumn('rejected_rows_gz', 'bytea')
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('register_imports').dropColumn('new_schools').dropColumn('rejected_rows_gz').execute();
}
