import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ResultRow } from './result-row';
import { copyLine } from '../db/copy';

const COPY_COLUMNS = [
  'run_id',
  'room_id',
  'school_id',
  'block_id',
  'ventilation_type',
  'pupils',
  'worst_season',
  'mean_co2_ppm',
  'peak_co2_ppm',
  'criteria_met',
  'risk_band',
  'risk_score',
  'pupil_hours_above',
  'reason',
  'units_recommended',
  'unit_count',
  'capital_cost_gbp',
  'annual_saving_gbp',
  'annual_saving_kwh',
  'annual_saving_kgco2e',
  'simple_payback_years',
  'discounted_payback_years',
  'npv_gbp',
  'pupil_hours_removed_per_1000_gbp',
  'capital_per_tonne_co2e_gbp',
  'baseline',
  'verdict',
  'annual_heating_saving_kwh',
  'annual_fan_saving_kwh',
  'annual_maintenance_saving_gbp',
  'replacement_cost_gbp',
  'pupil_hours_removed',
  'heating_fuel',
  'fuel_price_gbp_per_kwh',
  'heating_efficiency',
  'price_source',
  'efficiency_source',
  'heating_degree_hours_kh',
  'unit_run_hours',
  'assumed_count',
  'risk_evidence',
  'installed_cost_gbp',
  'life_years',
  'unit_lines',
] as const;

/** The COPY statement for result rows (also used by the benchmark's I/O floor). */
export const copyResultsSql = (table = 'room_results') => `COPY ${table} (${COPY_COLUMNS.join(', ')}) FROM STDIN`;

/** One result row as a line of COPY text. */
export function toCopyLine(r: ResultRow): string {
  return copyLine([
    r.runId,
    r.roomId,
    r.schoolId,
    r.blockId,
    r.ventilationType,
    r.pupils,
    r.worstSeason,
    r.meanCo2Ppm,
    r.peakCo2Ppm,
    r.criteriaMet,
    r.riskBand,
    r.riskScore,
    r.pupilHoursAbove,
    r.reason,
    r.unitsRecommended,
    r.unitCount,
    r.capitalCostGbp,
    r.annualSavingGbp,
    r.annualSavingKwh,
    r.annualSavingKgCo2e,
    r.simplePaybackYears,
    r.discountedPaybackYears,
    r.npvGbp,
    r.pupilHoursRemovedPer1000Gbp,
    r.capitalPerTonneCo2eGbp,
    r.baseline,
    r.verdict,
    r.annualHeatingSavingKwh,
    r.annualFanSavingKwh,
    r.annualMaintenanceSavingGbp,
    r.replacementCostGbp,
    r.pupilHoursRemoved,
    r.heatingFuel,
    r.fuelPriceGbpPerKwh,
    r.heatingEfficiency,
    r.priceSource,
    r.efficiencySource,
    r.heatingDegreeHoursKh,
    r.unitRunHours,
    r.assumedCount,
    r.riskEvidence,
    r.installedCostGbp,
    r.lifeYears,
    r.unitLines,
  ]);
}

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
