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
  await sql`CREATE INDEX assessment_runs_active_idx ON assessment_runs (trust_id) WHERE status IN ('queued', 'running')`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX IF EXISTS assessment_runs_active_idx`.execute(db);
  await db.schema.alterTable('assessment_runs').dropColumn('job_id').dropColumn('resume_after_room_id').dropColumn('problems').dropColumn('updated_at').execute();
  await db.schema.dropTable('assumption_sets').execute();
}
