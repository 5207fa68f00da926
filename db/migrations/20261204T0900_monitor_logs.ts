import { sql, type Kysely } from 'kysely';

// Frozen migration: classroom CO2 monitor logs. One row per uploaded file (monitor_logs), one per sensor or
// column in it (monitor_log_sensors, with the room it is matched to), and the readings as per sensor-day
// arrays (monitor_log_days): times as little-endian int32 seconds since the day's local midnight, CO2 as
// int16 ppm, extra columns as float32 blocks. About 6 bytes a reading before compression; rows above
// 256 bytes are compressed (toast_tuple_target), which shrinks regular times to almost nothing. A log's
// readings are exactly the days of its sensors, so deleting them removes exactly its readings.
// monitor_sensor_mappings remembers which room a sensor name belongs to, per trust.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('monitor_logs')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('created_by_user_id', 'text')
    .addColumn('created_by_email', 'text')
    .addColumn('file_name', 'text', (c) => c.notNull())
    .addColumn('file_kind', 'text', (c) => c.notNull())
    .addColumn('file_size_bytes', 'bigint', (c) => c.notNull())
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('previewed'))
    .addColumn('layout', 'jsonb', (c) => c.notNull())
    .addColumn('time_basis', 'text', (c) => c.notNull())
    .addColumn('reading_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('first_at', 'timestamptz')
    .addColumn('last_at', 'timestamptz')
    .addColumn('problems', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('outcome', 'jsonb')
    .addColumn('committed_at', 'timestamptz')
    .addColumn('committed_by_email', 'text')
    .addColumn('deleted_at', 'timestamptz')
    .addColumn('deleted_by_email', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('monitor_logs_file_kind_known', sql`file_kind IN ('csv', 'xlsx')`)
    .addCheckConstraint('monitor_logs_status_known', sql`status IN ('previewed', 'committed', 'cancelled', 'deleted')`)
    .execute();
  await db.schema
    .createIndex('monitor_logs_trust_created_idx')
    .on('monitor_logs')
    .columns(['trust_id', 'created_at'])
    .execute();
  await sql`CREATE TRIGGER monitor_logs_set_updated_at BEFORE UPDATE ON monitor_logs
    FOR EACH ROW EXECUTE FUNCTION set_updated_at()`.execute(db);

  await db.schema
    .createTable('monitor_log_sensors')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('log_id', 'uuid', (c) => c.notNull().references('monitor_logs.id').onDelete('cascade'))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('sensor_key', 'text', (c) => c.notNull())
    .addColumn('room_id', 'uuid', (c) => c.references('rooms.id').onDelete('set null'))
    .addColumn('match', 'text', (c) => c.notNull())
    .addColumn('candidates', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('reading_count', 'integer', (c) => c.notNull())
    .addColumn('day_count', 'integer', (c) => c.notNull())
    .addColumn('first_at', 'timestamptz')
    .addColumn('last_at', 'timestamptz')
    .addColumn('interval_seconds', 'integer')
    .addColumn('extras', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('problems', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addUniqueConstraint('monitor_log_sensors_key_unique_in_log', ['log_id', 'sensor_key'])
    .addCheckConstraint(
      'monitor_log_sensors_match_known',
      sql`match IN ('room_code', 'remembered', 'chosen', 'unmatched', 'ambiguous', 'skipped')`,
    )
    .execute();
  await db.schema.createIndex('monitor_log_sensors_room_idx').on('monitor_log_sensors').column('room_id').execute();

  await db.schema
    .createTable('monitor_log_days')
    .addColumn('sensor_id', 'uuid', (c) => c.notNull().references('monitor_log_sensors.id').onDelete('cascade'))
    .addColumn('day', 'date', (c) => c.notNull())
    .addColumn('reading_count', 'integer', (c) => c.notNull())
    .addColumn('times_s', 'bytea', (c) => c.notNull())
    .addColumn('co2_ppm', 'bytea', (c) => c.notNull())
    .addColumn('extras', 'bytea')
    .addPrimaryKeyConstraint('monitor_log_days_pk', ['sensor_id', 'day'])
    .execute();
  await sql`ALTER TABLE monitor_log_days SET (toast_tuple_target = 256)`.execute(db);

  await db.schema
    .createTable('monitor_sensor_mappings')
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('sensor_key', 'text', (c) => c.notNull())
    .addColumn('room_id', 'uuid', (c) => c.notNull().references('rooms.id').onDelete('cascade'))
    .addColumn('updated_by_email', 'text')
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('monitor_sensor_mappings_pk', ['trust_id', 'sensor_key'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('monitor_sensor_mappings').execute();
  await db.schema.dropTable('monitor_log_days').execute();
  await db.schema.dropTable('monitor_log_sensors').execute();
  await db.schema.dropTable('monitor_logs').execute();
}
