import { sql, type Kysely } from 'kysely';

// Frozen migration: capital programmes (saved scenarios). Each keeps its settings, a snapshot of the
// candidate rooms it was planned from (so the same programme always gives the same plan, whatever later
// assessments say), where each room went, and how the plan was found (method, bound, gap).

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('programmes')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    // Null: the whole trust; otherwise the schools a school-limited member planned for.
    .addColumn('school_ids', sql`uuid[]`)
    .addColumn('settings', 'jsonb', (c) => c.notNull())
    .addColumn('candidates', 'jsonb', (c) => c.notNull())
    .addColumn('unplannable', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    // Which assessment runs and assumption versions the candidates came from.
    .addColumn('source', 'jsonb', (c) => c.notNull())
    // [{ roomId, year, windowId }]
    .addColumn('placements', 'jsonb', (c) => c.notNull())
    .addColumn('solve', 'jsonb', (c) => c.notNull())
    // Objective of the plan with no rooms pinned by hand, to say what the pins cost.
    .addColumn('free_objective', 'double precision')
    .addColumn('created_by_email', 'text')
    .addColumn('updated_by_email', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('programmes_name_present', sql`length(trim(name)) BETWEEN 1 AND 120`)
    .addUniqueConstraint('programmes_name_unique_in_trust', ['trust_id', 'name'])
    .execute();
  await db.schema
    .createIndex('programmes_trust_updated_idx')
    .on('programmes')
    .columns(['trust_id', 'updated_at'])
    .execute();
  await sql`CREATE TRIGGER programmes_set_updated_at BEFORE UPDATE ON programmes
    FOR EACH ROW EXECUTE FUNCTION set_updated_at()`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('programmes').execute();
}
