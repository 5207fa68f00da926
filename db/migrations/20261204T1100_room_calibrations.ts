import { sql, type Kysely } from 'kysely';

// Frozen migration: per-room calibrations from measured CO2, versioned like assumption sets. Each version
// records what was fitted (window use per season, infiltration) and the evidence; at most one is active per
// room; reverting leaves the history and makes none active. The engine input reader applies the active one.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('room_calibrations')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('room_id', 'uuid', (c) => c.notNull().references('rooms.id').onDelete('cascade'))
    .addColumn('version', 'integer', (c) => c.notNull())
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('active'))
    .addColumn('days_used', 'integer', (c) => c.notNull())
    .addColumn('label', 'text', (c) => c.notNull())
    .addColumn('calibration', 'jsonb', (c) => c.notNull())
    .addColumn('fit', 'jsonb', (c) => c.notNull())
    .addColumn('assumptions_version', 'text', (c) => c.notNull())
    .addColumn('created_by_email', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('ended_at', 'timestamptz')
    .addColumn('ended_by_email', 'text')
    .addUniqueConstraint('room_calibrations_version_unique_in_room', ['room_id', 'version'])
    .addCheckConstraint('room_calibrations_status_known', sql`status IN ('active', 'reverted', 'superseded')`)
    .execute();
  await sql`CREATE UNIQUE INDEX room_calibrations_one_active_per_room ON room_calibrations (room_id) WHERE status = 'active'`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('room_calibrations').execute();
}
