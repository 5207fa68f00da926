import { sql, type Kysely } from 'kysely';

// Frozen migration: what the analysis of monitor logs keeps for the views. Per room-day statistics
// (monitor_room_days), per room the seasons' measured picture as JSON (monitor_room_analyses), and the
// analysis runs with their progress (monitor_analysis_runs). All are rebuilt from monitor_log_days.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('monitor_room_days')
    .addColumn('room_id', 'uuid', (c) => c.notNull().references('rooms.id').onDelete('cascade'))
    .addColumn('day', 'date', (c) => c.notNull())
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('season', 'text', (c) => c.notNull())
    .addColumn('reading_count', 'integer', (c) => c.notNull())
    .addColumn('coverage', 'float8', (c) => c.notNull())
    .addColumn('occupied', 'boolean', (c) => c.notNull())
    .addColumn('occupied_mean_ppm', 'float8')
    .addColumn('min_ppm', 'float8', (c) => c.notNull())
    .addColumn('max_ppm', 'float8', (c) => c.notNull())
    .addColumn('night_min_ppm', 'float8')
    .addColumn('thresholds_ppm', sql`float8[]`, (c) => c.notNull())
    .addColumn('minutes_over', sql`float8[]`, (c) => c.notNull())
    .addColumn('longest_run_minutes', sql`float8[]`, (c) => c.notNull())
    .addPrimaryKeyConstraint('monitor_room_days_pk', ['room_id', 'day'])
    .execute();

  await db.schema
    .createTable('monitor_room_analyses')
    .addColumn('room_id', 'uuid', (c) => c.primaryKey().references('rooms.id').onDelete('cascade'))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('school_id', 'uuid', (c) => c.notNull().references('schools.id').onDelete('cascade'))
    .addColumn('days', 'integer', (c) => c.notNull())
    .addColumn('first_date', 'date')
    .addColumn('last_date', 'date')
    .addColumn('result', 'jsonb', (c) => c.notNull())
    .addColumn('criterion_pack_id', 'text', (c) => c.notNull())
    .addColumn('assumptions_version', 'text', (c) => c.notNull())
    .addColumn('analysed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema
    .createIndex('monitor_room_analyses_trust_idx')
    .on('monitor_room_analyses')
    .column('trust_id')
    .execute();

  await db.schema
    .createTable('monitor_analysis_runs')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('queued'))
    .addColumn('room_ids', sql`uuid[]`)
    .addColumn('rooms_total', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('rooms_done', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('error', 'text')
    .addColumn('created_by_email', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('finished_at', 'timestamptz')
    .addCheckConstraint(
      'monitor_analysis_runs_status_known',
      sql`status IN ('queued', 'running', 'succeeded', 'failed')`,
    )
    .execute();
  await db.schema
    .createIndex('monitor_analysis_runs_trust_created_idx')
    .on('monitor_analysis_runs')
    .columns(['trust_id', 'created_at'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('monitor_analysis_runs').execute();
  await db.schema.dropTable('monitor_room_analyses').execute();
  await db.schema.dropTable('monitor_room_days').execute();
}
