import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ResultRow } from './result-row';
import { binaryCopy } from '../db/copy';

/** The result columns as written, each with its binary COPY type and its value in a result row. */
const RESULT_COPY = binaryCopy<ResultRow>([
  ['run_id', 'uuid', (r) => r.runId],
  ['room_id', 'uuid', (r) => r.roomId],
  ['school_id', 'uuid', (r) => r.schoolId],
  ['block_id', 'uuid', (r) => r.blockId],
  ['ventilation_type', 'text', (r) => r.ventilationType],
  ['pupils', 'int4', (r) => r.pupils],
  ['worst_season', 'text', (r) => r.worstSeason],
  ['mean_co2_ppm', 'float8', (r) => r.meanCo2Ppm],
  ['peak_co2_ppm', 'float8', (r) => r.peakCo2Ppm],
  ['criteria_met', 'bool', (r) => r.criteriaMet],
  ['risk_band', 'int2', (r) => r.riskBand],
  ['risk_score', 'float8', (r) => r.riskScore],
  ['pupil_hours_above', 'float8', (r) => r.pupilHoursAbove],
  ['reason', 'text', (r) => r.reason],
  ['units_recommended', 'text', (r) => r.unitsRecommended],
  ['unit_count', 'int4', (r) => r.unitCount],
  ['capital_cost_gbp', 'float8', (r) => r.capitalCostGbp],
  ['annual_saving_gbp', 'float8', (r) => r.annualSavingGbp],
  ['annual_saving_kwh', 'float8', (r) => r.annualSavingKwh],
  ['annual_saving_kgco2e', 'float8', (r) => r.annualSavingKgCo2e],
  ['simple_payback_years', 'float8', (r) => r.simplePaybackYears],
  ['discounted_payback_years', 'float8', (r) => r.discountedPaybackYears],
  ['npv_gbp', 'float8', (r) => r.npvGbp],
  ['pupil_hours_removed_per_1000_gbp', 'float8', (r) => r.pupilHoursRemovedPer1000Gbp],
  ['capital_per_tonne_co2e_gbp', 'float8', (r) => r.capitalPerTonneCo2eGbp],
  ['baseline', 'text', (r) => r.baseline],
  ['verdict', 'text', (r) => r.verdict],
  ['annual_heating_saving_kwh', 'float8', (r) => r.annualHeatingSavingKwh],
  ['annual_fan_saving_kwh', 'float8', (r) => r.annualFanSavingKwh],
  ['annual_maintenance_saving_gbp', 'float8', (r) => r.annualMaintenanceSavingGbp],
  ['replacement_cost_gbp', 'float8', (r) => r.replacementCostGbp],
  ['pupil_hours_removed', 'float8', (r) => r.pupilHoursRemoved],
  ['heating_fuel', 'text', (r) => r.heatingFuel],
  ['fuel_price_gbp_per_kwh', 'float8', (r) => r.fuelPriceGbpPerKwh],
  ['heating_efficiency', 'float8', (r) => r.heatingEfficiency],
  ['price_source', 'text', (r) => r.priceSource],
  ['efficiency_source', 'text', (r) => r.efficiencySource],
  ['heating_degree_hours_kh', 'float8', (r) => r.heatingDegreeHoursKh],
  ['unit_run_hours', 'float8', (r) => r.unitRunHours],
  ['assumed_count', 'int4', (r) => r.assumedCount],
  ['risk_evidence', 'text', (r) => r.riskEvidence],
  ['installed_cost_gbp', 'float8', (r) => r.installedCostGbp],
  ['life_years', 'float8', (r) => r.lifeYears],
  ['unit_lines', 'text', (r) => r.unitLines],
]);

/** The COPY statement for result rows in binary format (also used by the benchmark's I/O floor). */
export const copyResultsSql = (table = 'room_results') => RESULT_COPY.sql(table);

/** Result rows as binary COPY pieces (numbers as 8-byte floats: nothing formatted or parsed as decimal text). */
export const resultPieces = (rows: Iterable<ResultRow>) => RESULT_COPY.pieces(rows);

/**
 * Makes a finished run's results current in ONE transaction: each school in its scope points at this run
 * (assessment_current), so views switch from the previous run's rows to this run's at once and never see a mix of
 * two runs of the same school; the run's dashboard figures per school are computed in the same transaction. Ranks are
 * not computed here: portfolio_ranks is rebuilt by the engine's one ranking rule when the succeeded-runs stamp
 * changes (ranking.repository). Returns false, changing nothing, unless the run is running with every chunk done.
 */
export async function makeRunCurrent(db: Kysely<Database>, runId: string): Promise<boolean> {
  return db.transaction().execute(async (trx) => {
    const run = await trx
      .selectFrom('assessment_runs')
      .select(['status', 'trust_id', 'school_id', 'chunks_done', 'chunks_total'])
      .where('id', '=', runId)
      .forUpdate()
      .executeTakeFirst();
    if (run?.status !== 'running' || run.chunks_done < run.chunks_total) return false;
    // One switch at a time per trust, so two runs finishing together see each other's final state.
    await sql`SELECT pg_advisory_xact_lock(hashtext(${`assessment-flip:${run.trust_id}`}))`.execute(trx);
    await sql`SELECT refresh_run_school_summaries(${runId}::uuid, NULL)`.execute(trx);
    const inScope = run.school_id === null ? sql`TRUE` : sql`s.id = ${run.school_id}::uuid`;
    await sql`
      INSERT INTO assessment_current (school_id, trust_id, run_id)
      SELECT s.id, s.trust_id, ${runId}::uuid FROM schools s WHERE s.trust_id = ${run.trust_id} AND ${inScope}
      ON CONFLICT (school_id) DO UPDATE SET run_id = EXCLUDED.run_id, trust_id = EXCLUDED.trust_id`.execute(trx);
    await trx
      .updateTable('assessment_runs')
      .set({
        status: 'succeeded',
        finished_at: new Date(),
        rooms_done: sql`GREATEST(rooms_done, rooms_total)`,
        error: null,
        updated_at: new Date(),
      })
      .where('id', '=', runId)
      .execute();
    return true;
  });
}

/** Removes a run's result rows (a failed run's, or a pruned one's: none of them is current). */
export async function deleteRunResults(db: Kysely<Database>, runId: string): Promise<void> {
  await db.deleteFrom('room_results').where('run_id', '=', runId).execute();
}
