/**
 * Invented assessed rooms for portfolio tests and the priorities benchmark, generated in SQL so that
 * 100,000 rooms insert in seconds. Values are pseudo-random but reproducible (setseed); tests read the
 * inserted rows back and work out what they expect from them independently of the code under test.
 */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../db/database';

export interface FixtureOptions {
  trustId: string;
  /** Create the trust row (false: add schools to an existing trust, e.g. the demo trust). */
  createTrust: boolean;
  schools: number;
  roomsPerSchool: number;
  /** 0–1, passed to setseed. */
  seed?: number;
  /** Prefix of school names, so several fixtures can live in one trust. */
  label?: string;
}

export interface Fixture {
  trustId: string;
  runId: string;
  schoolIds: string[];
}

/** Inserts schools (two blocks each: an old gas-heated one and a heat-pump one), rooms, a succeeded run and current results. */
export async function insertAssessedRooms(db: Kysely<Database>, o: FixtureOptions): Promise<Fixture> {
  const label = o.label ?? 'Fixture';
  return db.transaction().execute(async (trx) => {
    await sql`SELECT setseed(${o.seed ?? 0.42})`.execute(trx);
    if (o.createTrust) {
      await trx
        .insertInto('trusts')
        .values({ id: o.trustId, name: `${label} Trust`, slug: o.trustId })
        .execute();
    }
    const schools = await sql<{ id: string }>`
      INSERT INTO schools (trust_id, name, phase, climate_region, heating_fuel)
      SELECT ${o.trustId}, ${label} || ' School ' || lpad(g::text, greatest(3, length(${o.schools}::text)), '0'), 'primary', 'london_south_east', 'gas'
      FROM generate_series(1, ${o.schools}) g RETURNING id`.execute(trx);
    const schoolIds = schools.rows.map((r) => r.id);
    await sql`
      INSERT INTO blocks (school_id, name, year_built, heating_fuel, heating_installed_year)
      SELECT s, b.name, b.year_built, b.fuel, b.installed
      FROM unnest(${schoolIds}::uuid[]) s,
        (VALUES ('Old Block', 1968, 'gas', 2003), ('New Block', 2019, 'heat_pump', 2019)) AS b(name, year_built, fuel, installed)`.execute(
      trx,
    );
    await sql`
      INSERT INTO rooms (school_id, block_id, code, name, floor_area_m2, ceiling_height_m, pupils, age_group, ventilation_type, glazing_area_m2, openable_area_m2)
      SELECT s.id, (SELECT id FROM blocks b WHERE b.school_id = s.id AND b.name = CASE WHEN g % 3 = 0 THEN 'New Block' ELSE 'Old Block' END),
        'R' || lpad(g::text, 5, '0'), 'Classroom ' || g, 55, 2.7, 20 + (g % 13), 'primary',
        (ARRAY['natural_single_sided', 'natural_cross', 'mechanical_extract'])[1 + g % 3], 10, 2
      FROM unnest(${schoolIds}::uuid[]) AS s(id), generate_series(1, ${o.roomsPerSchool}) g`.execute(trx);
    const run = await trx
      .insertInto('assessment_runs')
      .values({
        trust_id: o.trustId,
        scope: 'trust',
        status: 'succeeded',
        rooms_total: o.schools * o.roomsPerSchool,
        rooms_done: o.schools * o.roomsPerSchool,
        started_at: new Date(),
        finished_at: new Date(),
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await sql`
      INSERT INTO room_results (run_id, room_id, school_id, block_id, ventilation_type, pupils, worst_season,
        mean_co2_ppm, peak_co2_ppm, criteria_met, risk_band, risk_score, pupil_hours_above, reason, units_recommended, unit_count,
        capital_cost_gbp, annual_saving_gbp, annual_saving_kwh, annual_saving_kgco2e, simple_payback_years, discounted_payback_years,
        npv_gbp, pupil_hours_removed_per_1000_gbp, capital_per_tonne_co2e_gbp, baseline, verdict, annual_heating_saving_kwh,
        annual_fan_saving_kwh, annual_maintenance_saving_gbp, replacement_cost_gbp, pupil_hours_removed, heating_fuel,
        fuel_price_gbp_per_kwh, heating_efficiency, price_source, efficiency_source, installed_cost_gbp, life_years, unit_lines)
      SELECT ${run.id}, v.room_id, v.school_id, v.block_id, v.ventilation_type, v.pupils, 'winter',
        v.mean, v.mean * 1.6, v.mean < 1500, v.band, v.risk, v.pupil_hours, 'Invented reason for ' || v.code,
        CASE WHEN v.units > 0 THEN v.units || ' × Wall unit 150' ELSE '' END, v.units,
        v.capital, v.saving, v.saving * 12, v.saving * 3, CASE WHEN v.saving > 0 THEN v.capital / v.saving END, NULL,
        v.saving * 12 - v.capital, CASE WHEN v.capital > 0 THEN v.pupil_hours * 0.8 * 1000 / v.capital END,
        CASE WHEN v.capital > 0 THEN v.capital / (v.saving * 3 * 15 / 1000) END,
        CASE WHEN v.units > 0 THEN 'same_air_without_recovery' END, CASE WHEN v.units > 0 THEN 'saves_slowly' END,
        v.saving * 14, -v.saving * 2, -60.0 * v.units, 0, v.pupil_hours * 0.8, 'gas', 0.07, 0.85, 'trust', 'trust',
        CASE WHEN v.units > 0 THEN v.capital END, CASE WHEN v.units > 0 THEN 15 END,
        CASE WHEN v.units > 0 THEN jsonb_build_array(jsonb_build_array(v.units, 'Wall unit 150'))::text END
      FROM (
        SELECT r.id AS room_id, r.school_id, r.block_id, r.ventilation_type, r.pupils, r.code,
          700 + floor(random() * 1800) AS mean, 1 + floor(random() * 4)::int AS band, random() AS risk,
          round((random() * 4000)::numeric, 1)::float8 AS pupil_hours,
          u.units, u.units * 6500.0 AS capital, u.units * (50 + random() * 200) AS saving
        FROM rooms r JOIN LATERAL (SELECT (CASE WHEN random() < 0.3 THEN 0 ELSE 1 + floor(random() * 3) END)::int AS units WHERE r.id IS NOT NULL) u ON true
        WHERE r.school_id = ANY(${schoolIds}::uuid[])
      ) v`.execute(trx);
    // The schools' current results are this run's, with its dashboard figures, as a finished run leaves them.
    await sql`SELECT refresh_run_school_summaries(${run.id}::uuid, NULL)`.execute(trx);
    await sql`
      INSERT INTO assessment_current (school_id, trust_id, run_id)
      SELECT s, ${o.trustId}, ${run.id}::uuid FROM unnest(${schoolIds}::uuid[]) s`.execute(trx);
    return { trustId: o.trustId, runId: run.id, schoolIds };
  });
}

/** Deletes a fixture trust and everything under it. */
export async function dropFixtureTrust(db: Kysely<Database>, trustId: string): Promise<void> {
  await db.deleteFrom('trusts').where('id', '=', trustId).execute();
}
