import { sql, type Kysely } from 'kysely';

// Frozen migration: numbers a practitioner can trust.
// - Unknown stays unknown: room values the engine can assume (use, ceiling height, pupils, adults, age group,
//   glazing and openable area, ventilation type) may be null instead of a made-up 0 or default.
// - Every field the engine reads is writable: window frame material and the room's own winter window opening.
// - Heating per block and school: a block's own fuel price and heating efficiency; schools record a heating
//   efficiency (seasonal COP up to 6 for heat pumps, exactly 1 for direct electric) instead of a boiler efficiency.
// - One set of limits: the CHECK constraints below copy the ranges of src/lib/engine/limits.ts (a test compares
//   them). They are added NOT VALID so that rows written under the older, wider limits still load; every new
//   write is checked.
// - Room results carry the appraisal's baseline, lines, hours and heating used; the rank lives only in
//   portfolio_ranks (built by the engine's one ranking rule), so the copies in room_results go.
// - Import previews keep the per-room changes they show.

const FRAMES = ['timber', 'pvc_u', 'metal', 'metal_thermal_break'];

const check = (table: string, name: string, condition: string) =>
  sql.raw(`ALTER TABLE ${table} ADD CONSTRAINT ${name} CHECK (${condition}) NOT VALID`);

const efficiencyByFuel = (fuel: string, column: string) =>
  `${column} IS NULL OR (${fuel} = 'heat_pump' AND ${column} BETWEEN 1 AND 6) OR (${fuel} = 'electric' AND ${column} = 1) OR (${fuel} NOT IN ('heat_pump', 'electric') AND ${column} BETWEEN 0.3 AND 1)`;

export async function up(db: Kysely<any>): Promise<void> {
  // Schools: heating efficiency by fuel; fuel price range.
  await sql`ALTER TABLE schools RENAME COLUMN boiler_efficiency TO heating_efficiency`.execute(db);
  await sql`ALTER TABLE schools DROP CONSTRAINT schools_boiler_efficiency_range`.execute(db);
  await sql`ALTER TABLE schools DROP CONSTRAINT schools_fuel_price_range`.execute(db);
  await check(
    'schools',
    'schools_heating_efficiency_range',
    efficiencyByFuel('heating_fuel', 'heating_efficiency'),
  ).execute(db);
  await check(
    'schools',
    'schools_fuel_price_range',
    'fuel_price_gbp_per_kwh IS NULL OR fuel_price_gbp_per_kwh BETWEEN 0.001 AND 2',
  ).execute(db);

  // Blocks: own fuel price and efficiency; air permeability range.
  await db.schema
    .alterTable('blocks')
    .addColumn('fuel_price_gbp_per_kwh', 'double precision')
    .addColumn('heating_efficiency', 'double precision')
    .execute();
  await check(
    'blocks',
    'blocks_fuel_price_range',
    'fuel_price_gbp_per_kwh IS NULL OR fuel_price_gbp_per_kwh BETWEEN 0.001 AND 2',
  ).execute(db);
  // A block without its own fuel burns the school's; the efficiency rule by fuel is checked by the API and engine.
  await check(
    'blocks',
    'blocks_heating_efficiency_range',
    `heating_efficiency IS NULL OR (heating_fuel = 'heat_pump' AND heating_efficiency BETWEEN 1 AND 6) OR (heating_fuel = 'electric' AND heating_efficiency = 1) OR (coalesce(heating_fuel, '') NOT IN ('heat_pump', 'electric') AND heating_efficiency BETWEEN 0.3 AND 6)`,
  ).execute(db);
  await sql`ALTER TABLE blocks DROP CONSTRAINT blocks_air_permeability_range`.execute(db);
  await check(
    'blocks',
    'blocks_air_permeability_range',
    'air_permeability_m3h_m2 IS NULL OR air_permeability_m3h_m2 BETWEEN 0.5 AND 50',
  ).execute(db);

  // Rooms: unknown values as null; new fields; the limits.
  for (const column of ['use', 'pupils', 'adults', 'glazing_area_m2', 'openable_area_m2'])
    await sql.raw(`ALTER TABLE rooms ALTER COLUMN ${column} DROP DEFAULT`).execute(db);
  for (const column of [
    'use',
    'ceiling_height_m',
    'pupils',
    'adults',
    'age_group',
    'glazing_area_m2',
    'openable_area_m2',
    'ventilation_type',
  ])
    await sql.raw(`ALTER TABLE rooms ALTER COLUMN ${column} DROP NOT NULL`).execute(db);
  await db.schema
    .alterTable('rooms')
    .addColumn('frame_material', 'text')
    .addColumn('winter_window_open_fraction', 'double precision')
    .execute();
  for (const name of [
    'rooms_floor_area_positive',
    'rooms_ceiling_height_range',
    'rooms_occupancy_not_negative',
    'rooms_orientation_range',
    'rooms_glazing_not_negative',
    'rooms_openable_within_glazing',
    'rooms_g_value_range',
    'rooms_mechanical_supply_not_negative',
  ])
    await sql.raw(`ALTER TABLE rooms DROP CONSTRAINT ${name}`).execute(db);
  await check(
    'rooms',
    'rooms_frame_material_known',
    `frame_material IS NULL OR frame_material IN (${FRAMES.map((f) => `'${f}'`).join(', ')})`,
  ).execute(db);
  await check('rooms', 'rooms_floor_area_range', 'floor_area_m2 BETWEEN 1 AND 5000').execute(db);
  await check(
    'rooms',
    'rooms_ceiling_height_range',
    'ceiling_height_m IS NULL OR ceiling_height_m BETWEEN 2 AND 12',
  ).execute(db);
  await check('rooms', 'rooms_pupils_range', 'pupils IS NULL OR pupils BETWEEN 0 AND 500').execute(db);
  await check('rooms', 'rooms_adults_range', 'adults IS NULL OR adults BETWEEN 0 AND 50').execute(db);
  await check(
    'rooms',
    'rooms_occupant_density',
    '(coalesce(pupils, 0) + coalesce(adults, 0)) * 0.5 <= floor_area_m2',
  ).execute(db);
  await check(
    'rooms',
    'rooms_orientation_range',
    'orientation_deg IS NULL OR orientation_deg BETWEEN 0 AND 359',
  ).execute(db);
  await check(
    'rooms',
    'rooms_glazing_range',
    'glazing_area_m2 IS NULL OR (glazing_area_m2 BETWEEN 0 AND 5000 AND glazing_area_m2 <= 3 * floor_area_m2)',
  ).execute(db);
  await check(
    'rooms',
    'rooms_openable_within_glazing',
    'openable_area_m2 IS NULL OR (openable_area_m2 >= 0 AND openable_area_m2 <= coalesce(glazing_area_m2, 3 * floor_area_m2))',
  ).execute(db);
  await check('rooms', 'rooms_g_value_range', 'glazing_g_value IS NULL OR glazing_g_value BETWEEN 0.1 AND 0.9').execute(
    db,
  );
  await check(
    'rooms',
    'rooms_mechanical_supply_range',
    'mechanical_supply_lps IS NULL OR mechanical_supply_lps BETWEEN 0 AND 5000',
  ).execute(db);
  await check(
    'rooms',
    'rooms_winter_window_range',
    'winter_window_open_fraction IS NULL OR winter_window_open_fraction BETWEEN 0 AND 1',
  ).execute(db);

  // Room results: the appraisal's baseline, lines, hours and heating; no rank copies.
  await sql`DROP INDEX IF EXISTS room_results_current_rank_idx`.execute(db);
  await sql`DROP INDEX IF EXISTS room_results_current_school_idx`.execute(db);
  await db.schema
    .alterTable('room_results')
    .dropColumn('rank')
    .dropColumn('score_risk')
    .dropColumn('score_cost_effectiveness')
    .dropColumn('score_payback')
    .addColumn('baseline', 'text')
    .addColumn('verdict', 'text')
    .addColumn('annual_heating_saving_kwh', 'double precision')
    .addColumn('annual_fan_saving_kwh', 'double precision')
    .addColumn('annual_maintenance_saving_gbp', 'double precision')
    .addColumn('replacement_cost_gbp', 'double precision')
    .addColumn('pupil_hours_removed', 'double precision')
    .addColumn('heating_fuel', 'text')
    .addColumn('fuel_price_gbp_per_kwh', 'double precision')
    .addColumn('heating_efficiency', 'double precision')
    .addColumn('price_source', 'text')
    .addColumn('efficiency_source', 'text')
    .addColumn('heating_degree_hours_kh', 'double precision')
    .addColumn('unit_run_hours', 'double precision')
    .addColumn('assumed_count', 'integer', (c) => c.notNull().defaultTo(0))
    .execute();
  await sql`CREATE INDEX room_results_current_school_idx ON room_results (trust_id, school_id) WHERE is_current`.execute(
    db,
  );
  // Ranks are derived data: rebuilt by the engine's rule on the next read.
  await sql`DELETE FROM portfolio_ranks`.execute(db);
  await sql`UPDATE portfolio_settings SET ranked_weights = NULL, ranked_stamp = NULL`.execute(db);

  await db.schema.alterTable('register_imports').addColumn('room_changes', 'jsonb').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('register_imports').dropColumn('room_changes').execute();
  await sql`DROP INDEX IF EXISTS room_results_current_school_idx`.execute(db);
  await db.schema
    .alterTable('room_results')
    .dropColumn('baseline')
    .dropColumn('verdict')
    .dropColumn('annual_heating_saving_kwh')
    .dropColumn('annual_fan_saving_kwh')
    .dropColumn('annual_maintenance_saving_gbp')
    .dropColumn('replacement_cost_gbp')
    .dropColumn('pupil_hours_removed')
    .dropColumn('heating_fuel')
    .dropColumn('fuel_price_gbp_per_kwh')
    .dropColumn('heating_efficiency')
    .dropColumn('price_source')
    .dropColumn('efficiency_source')
    .dropColumn('heating_degree_hours_kh')
    .dropColumn('unit_run_hours')
    .dropColumn('assumed_count')
    .addColumn('rank', 'integer')
    .addColumn('score_risk', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('score_cost_effectiveness', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('score_payback', 'double precision', (c) => c.notNull().defaultTo(0))
    .execute();
  await sql`CREATE INDEX room_results_current_rank_idx ON room_results (trust_id, rank) WHERE is_current`.execute(db);
  await sql`CREATE INDEX room_results_current_school_idx ON room_results (trust_id, school_id, rank) WHERE is_current`.execute(
    db,
  );

  for (const name of [
    'rooms_frame_material_known',
    'rooms_floor_area_range',
    'rooms_ceiling_height_range',
    'rooms_pupils_range',
    'rooms_adults_range',
    'rooms_occupant_density',
    'rooms_orientation_range',
    'rooms_glazing_range',
    'rooms_openable_within_glazing',
    'rooms_g_value_range',
    'rooms_mechanical_supply_range',
    'rooms_winter_window_range',
  ])
    await sql.raw(`ALTER TABLE rooms DROP CONSTRAINT ${name}`).execute(db);
  await db.schema.alterTable('rooms').dropColumn('frame_material').dropColumn('winter_window_open_fraction').execute();
  await sql`UPDATE rooms SET use = coalesce(use, 'classroom'), ceiling_height_m = coalesce(ceiling_height_m, 2.7),
    pupils = coalesce(pupils, 0), adults = coalesce(adults, 0), age_group = coalesce(age_group, 'secondary'),
    glazing_area_m2 = coalesce(glazing_area_m2, 0), openable_area_m2 = coalesce(openable_area_m2, 0),
    ventilation_type = coalesce(ventilation_type, 'natural_single_sided')`.execute(db);
  for (const column of [
    'use',
    'ceiling_height_m',
    'pupils',
    'adults',
    'age_group',
    'glazing_area_m2',
    'openable_area_m2',
    'ventilation_type',
  ])
    await sql.raw(`ALTER TABLE rooms ALTER COLUMN ${column} SET NOT NULL`).execute(db);
  await sql`ALTER TABLE rooms ALTER COLUMN use SET DEFAULT 'classroom', ALTER COLUMN pupils SET DEFAULT 0,
    ALTER COLUMN adults SET DEFAULT 0, ALTER COLUMN glazing_area_m2 SET DEFAULT 0, ALTER COLUMN openable_area_m2 SET DEFAULT 0`.execute(
    db,
  );
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_floor_area_positive CHECK (floor_area_m2 > 0 AND floor_area_m2 <= 5000)`.execute(
    db,
  );
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_ceiling_height_range CHECK (ceiling_height_m BETWEEN 2 AND 12)`.execute(
    db,
  );
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_occupancy_not_negative CHECK (pupils >= 0 AND adults >= 0)`.execute(
    db,
  );
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_orientation_range CHECK (orientation_deg IS NULL OR orientation_deg BETWEEN 0 AND 359)`.execute(
    db,
  );
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_glazing_not_negative CHECK (glazing_area_m2 >= 0)`.execute(db);
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_openable_within_glazing CHECK (openable_area_m2 >= 0 AND openable_area_m2 <= glazing_area_m2)`.execute(
    db,
  );
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_g_value_range CHECK (glazing_g_value IS NULL OR (glazing_g_value > 0 AND glazing_g_value <= 1))`.execute(
    db,
  );
  await sql`ALTER TABLE rooms ADD CONSTRAINT rooms_mechanical_supply_not_negative CHECK (mechanical_supply_lps IS NULL OR mechanical_supply_lps >= 0)`.execute(
    db,
  );

  await sql`ALTER TABLE blocks DROP CONSTRAINT blocks_air_permeability_range`.execute(db);
  await sql`ALTER TABLE blocks ADD CONSTRAINT blocks_air_permeability_range CHECK (air_permeability_m3h_m2 IS NULL OR (air_permeability_m3h_m2 > 0 AND air_permeability_m3h_m2 <= 100))`.execute(
    db,
  );
  await sql`ALTER TABLE blocks DROP CONSTRAINT blocks_heating_efficiency_range`.execute(db);
  await sql`ALTER TABLE blocks DROP CONSTRAINT blocks_fuel_price_range`.execute(db);
  await db.schema.alterTable('blocks').dropColumn('fuel_price_gbp_per_kwh').dropColumn('heating_efficiency').execute();

  await sql`ALTER TABLE schools DROP CONSTRAINT schools_fuel_price_range`.execute(db);
  await sql`ALTER TABLE schools DROP CONSTRAINT schools_heating_efficiency_range`.execute(db);
  await sql`UPDATE schools SET heating_efficiency = NULL WHERE heating_efficiency > 1`.execute(db);
  await sql`ALTER TABLE schools RENAME COLUMN heating_efficiency TO boiler_efficiency`.execute(db);
  await sql`ALTER TABLE schools ADD CONSTRAINT schools_boiler_efficiency_range CHECK (boiler_efficiency IS NULL OR (boiler_efficiency > 0 AND boiler_efficiency <= 1))`.execute(
    db,
  );
  await sql`ALTER TABLE schools ADD CONSTRAINT schools_fuel_price_range CHECK (fuel_price_gbp_per_kwh IS NULL OR (fuel_price_gbp_per_kwh > 0 AND fuel_price_gbp_per_kwh < 5))`.execute(
    db,
  );
}
