import { sql, type Kysely } from 'kysely';

// Frozen migration: register imports (one row per uploaded file, with its preview and outcome)
// and the column mappings a trust has confirmed, so the next import maps the same headers itself.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('register_imports')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('created_by_user_id', 'text')
    .addColumn('created_by_email', 'text')
    .addColumn('file_name', 'text', (c) => c.notNull())
    .addColumn('file_kind', 'text', (c) => c.notNull().check(sql`file_kind IN ('xlsx', 'csv')`))
    .addColumn('file_size_bytes', 'integer', (c) => c.notNull())
    .addColumn('status', 'text', (c) =>
      c.notNull().defaultTo('previewed').check(sql`status IN ('previewed', 'committed', 'cancelled', 'failed')`),
    )
    .addColumn('header', 'jsonb')
    .addColumn('summary', 'jsonb', (c) => c.notNull())
    .addColumn('problems', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('problem_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('missing_rooms', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    // The normalised rows as gzip-compressed JSON, kept until the import is committed or cancelled.
    .addColumn('rows_gz', 'bytea')
    .addColumn('outcome', 'jsonb')
    .addColumn('committed_by_email', 'text')
    .addColumn('committed_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema
    .createIndex('register_imports_trust_created_idx')
    .on('register_imports')
    .columns(['trust_id', 'created_at'])
    .execute();
  await sql`CREATE TRIGGER register_imports_set_updated_at BEFORE UPDATE ON register_imports
    FOR EACH ROW EXECUTE FUNCTION set_updated_at()`.execute(db);

  await db.schema
    .createTable('register_column_mappings')
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('header_key', 'text', (c) => c.notNull())
    .addColumn('field', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('register_column_mappings_pk', ['trust_id', 'header_key'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('register_column_mappings').execute();
  await db.schema.dropTable('register_imports').execute();
}
