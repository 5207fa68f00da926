import { sql, type Kysely } from 'kysely';

// Frozen migration: versioned assumption sets per trust (the unit catalogue lives inside each set,
// so editing it makes a new version too), and the bookkeeping a batch run needs to resume or fail
// cleanly (its pg-boss job, rooms the engine could not assess).

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('assumption_sets')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('version', 'integer', (c) => c.notNull().check(sql`version >= 1`))
    .addColumn('label', 'text', (c) => c.notNull())
    .addColumn('values', 'jsonb', (c) => c.notNull())
    .addColumn('change_summary', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('created_by_user_id', 'text')
    .addColumn('created_by_email', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('assumption_sets_version_unique_in_trust', ['trust_id', 'version'])
    .execute();

  await db.schema
    .alterTable('assessment_runs')
    .addColumn('job_id', 'text')
    .addColumn('resume_after_room_id', 'uuid')
    .addColumn('problems', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  // Result details are ~7 kB of JSON each: lz4 compresses them several times faster than the default pglz,
  // and a low toast_tuple_target moves them out of the row, so flipping is_current and rank rewrites only
  // a ~300-byte row and reuses the stored detail.
  await sql`ALTER TABLE room_results SET (toast_tuple_target = 256)`.execute(db);
  await sql`DO $$ BEGIN ALTER TABLE room_results ALTER COLUMN detail SET COMPRESSION lz4;
            EXCEPTION WHEN feature_not_supported OR invalid_parameter_value THEN NULL; END $$`.execute(db);
  // Deleting a room cascades to its results of every run; without this the cascade scans room_results.
  await sql`CREATE INDEX room_results_room_all_idx ON room_results (room_id)`.execute(db);
  await sql`CREATE INDEX assessment_runs_active_idx ON assessment_runs (trust_id) WHERE status IN ('queued', 'running')`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX IF EXISTS assessment_runs_active_idx`.execute(db);
  await sql`DROP INDEX IF EXISTS room_results_room_all_idx`.execute(db);
  await sql`ALTER TABLE room_results ALTER COLUMN detail SET COMPRESSION default`.execute(db);
  await sql`ALTER TABLE room_results RESET (toast_tuple_target)`.execute(db);
  await db.schema
    .alterTable('assessment_runs')
    .dropColumn('job_id')
    .dropColumn('resume_after_room_id')
    .dropColumn('problems')
    .dropColumn('updated_at')
    .execute();
  await db.schema.dropTable('assumption_sets').execute();
}
