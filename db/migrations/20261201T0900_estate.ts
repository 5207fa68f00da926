import { sql, type Kysely } from 'kysely';

// Frozen migration: the estate (trusts, schools, blocks, rooms) and the audit trail.
// Lists of codes are copied here on purpose: a migration must never import app code.

const PHASES = ['nursery', 'primary', 'secondary', 'all_through', 'special', 'further_education'];
const ROOM_USES = [
  'classroom',
  'science_lab',
  'practical',
  'ict_room',
  'music_room',
  'hall',
  'sports_hall',
  'library',
  'office',
  'staff_room',
  'other',
];
const AGE_GROUPS = ['early_years', 'primary', 'secondary', 'sixth_form', 'adult'];
const WINDOW_TYPES = ['side_hung', 'top_hung', 'bottom_hung', 'sliding_sash', 'tilt_and_turn', 'pivot', 'fixed'];
const VENTILATION_TYPES = [
  'natural_single_sided',
  'natural_cross',
  'mechanical_extract',
  'mechanical_supply_extract',
  'heat_recovery_unit',
  'hybrid',
];
const FUELS = ['gas', 'oil', 'lpg', 'electric', 'heat_pump', 'biomass', 'district_heat'];
const CONSTRUCTION = [
  'solid_masonry',
  'cavity_masonry',
  'system_built',
  'timber_frame',
  'steel_frame',
  'concrete_frame',
  'modular',
];
const HEATING_TYPES = ['wet_radiators', 'underfloor', 'warm_air', 'electric_panels', 'heat_pump_wet', 'none'];
const REGIONS = [
  'london_south_east',
  'south_west',
  'east_anglia',
  'midlands',
  'north_west',
  'north_east',
  'wales',
  'scotland',
  'northern_ireland',
];

const inList = (column: string, values: string[]) =>
  sql.raw(`${column} IN (${values.map((v) => `'${v}'`).join(', ')})`);

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE OR REPLACE FUNCTION set_updated_at() RETURNS trigger AS $$
    BEGIN NEW.updated_at = now(); RETURN NEW; END; $$ LANGUAGE plpgsql`.execute(db);

  await db.schema
    .createTable('trusts')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('name', 'text', (c) => c.notNull().check(sql`length(trim(name)) > 0`))
    .addColumn('slug', 'text', (c) => c.notNull().unique())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();

  await db.schema
    .createTable('schools')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('reference_number', 'text')
    .addColumn('phase', 'text', (c) => c.notNull())
    .addColumn('climate_region', 'text', (c) => c.notNull())
    .addColumn('address', 'text')
    .addColumn('timetable', 'jsonb')
    .addColumn('heating_fuel', 'text', (c) => c.notNull().defaultTo('gas'))
    .addColumn('fuel_price_gbp_per_kwh', 'double precision')
    .addColumn('boiler_efficiency', 'double precision')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('schools_name_present', sql`length(trim(name)) > 0`)
    .addCheckConstraint('schools_phase_known', inList('phase', PHASES))
    .addCheckConstraint('schools_region_known', inList('climate_region', REGIONS))
    .addCheckConstraint('schools_fuel_known', inList('heating_fuel', FUELS))
    .addCheckConstraint(
      'schools_fuel_price_range',
      sql`fuel_price_gbp_per_kwh IS NULL OR (fuel_price_gbp_per_kwh > 0 AND fuel_price_gbp_per_kwh < 5)`,
    )
    .addCheckConstraint(
      'schools_boiler_efficiency_range',
      sql`boiler_efficiency IS NULL OR (boiler_efficiency > 0 AND boiler_efficiency <= 1)`,
    )
    .addUniqueConstraint('schools_name_unique_in_trust', ['trust_id', 'name'])
    .addUniqueConstraint('schools_reference_unique_in_trust', ['trust_id', 'reference_number'])
    .execute();

  await db.schema
    .createTable('blocks')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('school_id', 'uuid', (c) => c.notNull().references('schools.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('year_built', 'integer')
    .addColumn('construction_type', 'text')
    .addColumn('air_permeability_m3h_m2', 'double precision')
    .addColumn('heating_type', 'text')
    .addColumn('heating_fuel', 'text')
    .addColumn('heating_installed_year', 'integer')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('blocks_name_present', sql`length(trim(name)) > 0`)
    .addCheckConstraint('blocks_year_built_range', sql`year_built IS NULL OR year_built BETWEEN 1700 AND 2100`)
    .addCheckConstraint(
      'blocks_construction_known',
      sql`construction_type IS NULL OR ${inList('construction_type', CONSTRUCTION)}`,
    )
    .addCheckConstraint(
      'blocks_air_permeability_range',
      sql`air_permeability_m3h_m2 IS NULL OR (air_permeability_m3h_m2 > 0 AND air_permeability_m3h_m2 <= 100)`,
    )
    .addCheckConstraint(
      'blocks_heating_type_known',
      sql`heating_type IS NULL OR ${inList('heating_type', HEATING_TYPES)}`,
    )
    .addCheckConstraint('blocks_heating_fuel_known', sql`heating_fuel IS NULL OR ${inList('heating_fuel', FUELS)}`)
    .addCheckConstraint(
      'blocks_heating_installed_range',
      sql`heating_installed_year IS NULL OR heating_installed_year BETWEEN 1900 AND 2100`,
    )
    .addUniqueConstraint('blocks_name_unique_in_school', ['school_id', 'name'])
    .addUniqueConstraint('blocks_id_school', ['id', 'school_id'])
    .execute();

  await db.schema
    .createTable('rooms')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('school_id', 'uuid', (c) => c.notNull().references('schools.id').onDelete('cascade'))
    .addColumn('block_id', 'uuid')
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('use', 'text', (c) => c.notNull().defaultTo('classroom'))
    .addColumn('floor_area_m2', 'double precision', (c) => c.notNull())
    .addColumn('ceiling_height_m', 'double precision', (c) => c.notNull())
    .addColumn('pupils', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('adults', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('age_group', 'text', (c) => c.notNull())
    .addColumn('orientation_deg', 'integer')
    .addColumn('glazing_area_m2', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('openable_area_m2', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('window_type', 'text')
    .addColumn('glazing_g_value', 'double precision')
    .addColumn('ventilation_type', 'text', (c) => c.notNull())
    .addColumn('mechanical_supply_lps', 'double precision')
    .addColumn('notes', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // A room's block must belong to the same school; deleting a block that still has rooms is refused.
    .addForeignKeyConstraint('rooms_block_in_same_school', ['block_id', 'school_id'], 'blocks', ['id', 'school_id'])
    .addUniqueConstraint('rooms_code_unique_in_school', ['school_id', 'code'])
    .addCheckConstraint('rooms_code_present', sql`length(trim(code)) > 0`)
    .addCheckConstraint('rooms_use_known', inList('use', ROOM_USES))
    .addCheckConstraint('rooms_age_group_known', inList('age_group', AGE_GROUPS))
    .addCheckConstraint('rooms_window_type_known', sql`window_type IS NULL OR ${inList('window_type', WINDOW_TYPES)}`)
    .addCheckConstraint('rooms_ventilation_known', inList('ventilation_type', VENTILATION_TYPES))
    .addCheckConstraint('rooms_floor_area_positive', sql`floor_area_m2 > 0 AND floor_area_m2 <= 5000`)
    .addCheckConstraint('rooms_ceiling_height_range', sql`ceiling_height_m BETWEEN 2 AND 12`)
    .addCheckConstraint('rooms_occupancy_not_negative', sql`pupils >= 0 AND adults >= 0`)
    .addCheckConstraint('rooms_orientation_range', sql`orientation_deg IS NULL OR orientation_deg BETWEEN 0 AND 359`)
    .addCheckConstraint('rooms_glazing_not_negative', sql`glazing_area_m2 >= 0`)
    .addCheckConstraint(
      'rooms_openable_within_glazing',
      sql`openable_area_m2 >= 0 AND openable_area_m2 <= glazing_area_m2`,
    )
    .addCheckConstraint(
      'rooms_g_value_range',
      sql`glazing_g_value IS NULL OR (glazing_g_value > 0 AND glazing_g_value <= 1)`,
    )
    .addCheckConstraint(
      'rooms_mechanical_supply_not_negative',
      sql`mechanical_supply_lps IS NULL OR mechanical_supply_lps >= 0`,
    )
    .execute();

  await db.schema.createIndex('blocks_school_idx').on('blocks').column('school_id').execute();
  await db.schema.createIndex('rooms_block_idx').on('rooms').column('block_id').execute();
  await db.schema.createIndex('rooms_school_use_idx').on('rooms').columns(['school_id', 'use']).execute();

  await db.schema
    .createTable('audit_events')
    .addColumn('id', 'bigserial', (c) => c.primaryKey())
    .addColumn('trust_id', 'text', (c) => c.references('trusts.id').onDelete('cascade'))
    .addColumn('actor_user_id', 'text')
    .addColumn('actor_email', 'text')
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('entity_type', 'text', (c) => c.notNull())
    .addColumn('entity_id', 'text')
    .addColumn('summary', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('before', 'jsonb')
    .addColumn('after', 'jsonb')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute();
  await db.schema
    .createIndex('audit_events_trust_time_idx')
    .on('audit_events')
    .columns(['trust_id', 'created_at'])
    .execute();

  for (const table of ['trusts', 'schools', 'blocks', 'rooms']) {
    await sql`CREATE TRIGGER ${sql.raw(`${table}_set_updated_at`)} BEFORE UPDATE ON ${sql.table(table)}
      FOR EACH ROW EXECUTE FUNCTION set_updated_at()`.execute(db);
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('audit_events').execute();
  await db.schema.dropTable('rooms').execute();
  await db.schema.dropTable('blocks').execute();
  await db.schema.dropTable('schools').execute();
  await db.schema.dropTable('trusts').execute();
  await sql`DROP FUNCTION IF EXISTS set_updated_at()`.execute(db);
}
