import { sql, type Kysely } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import type { RunProblem } from '../../../../db/tables/assessments';
import type { ResultRow } from './result-row';
import { copyLine, copyLines, copyPieces } from '../db/copy';

const COPY_COLUMNS = [
  'run_id',
  'room_id',
  'trust_id',
  'school_id',
  'block_id',
  'ventilation_type',
  'pupils',
  'is_current',
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
  'detail',
  'risk_evidence',
] as const;

/** Rows a run must have written before the switch to current refreshes the table's statistics first. */
const ANALYZE_AFTER_ROWS = 1000;

/** The COPY statement for result rows (also used by the benchmark's I/O floor). */
export const copyResultsSql = (table = 'room_results') => `COPY ${table} (${COPY_COLUMNS.join(', ')}) FROM STDIN`;

/** One result row as a line of COPY text, not yet current. */
export function toCopyLine(r: ResultRow): string {
  return copyLine([
    r.runId,
    r.roomId,
    r.trustId,
    r.schoolId,
    r.blockId,
    r.ventilationType,
    r.pupils,
    false,
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
    r.detailJson,
    r.riskEvidence,
  ]);
}

/** The run was taken over by another worker (this one was thought dead): stop without touching it. */
export class RunTakenOver extends Error {
  constructor(runId: string) {
    super(`Another worker is working run ${runId} now`);
    this.name = 'RunTakenOver';
  }
}

/**
 * Commits one chunk: its result rows (not current) and the run's progress, in one transaction, so a crash
 * leaves either the whole chunk or none of it and the resume point always matches what is written. Only
 * the worker that holds the run may commit (RunTakenOver otherwise, and nothing is written).
 */
export async function commitChunk(
  pool: pg.Pool,
  run: { id: string; workerId: string },
  rows: ResultRow[],
  chunk: { roomsDone: number; lastRoomId: string; problems: RunProblem[] },
): Promise<void> {
  const client = await pool.connect();
  try {
    await client.query('BEGIN');
    const progress = await client.query(
      `UPDATE assessment_runs SET rooms_done = rooms_done + $2, rooms_total = GREATEST(rooms_total, rooms_done + $2),
         resume_after_room_id = $3, problems = problems || $4::jsonb, heartbeat_at = now(), updated_at = now()
       WHERE id = $1 AND worker_id = $5 AND status = 'running'`,
      [run.id, chunk.roomsDone, chunk.lastRoomId, JSON.stringify(chunk.problems), run.workerId],
    );
    if (progress.rowCount !== 1) throw new RunTakenOver(run.id);
    if (rows.length > 0) await copyLines(client, copyResultsSql(), copyPieces(rows, toCopyLine));
    await client.query('COMMIT');
  } catch (error) {
    await client.query('ROLLBACK').catch(() => undefined);
    throw error;
  } finally {
    client.release();
  }
}

export interface FlipInput {
  runId: string;
  /** The worker holding the run: the flip changes nothing when another holds it now. */
  workerId: string;
  trustId: string;
  schoolId: string | null;
}

/**
 * Makes the run's results the current ones in ONE transaction: older current results of the rooms in scope
 * stop being current and this run's become current, so views never see a mix of two runs of the same rooms.
 * Ranks are not computed here: the trust's ranks (portfolio_ranks) are rebuilt by the engine's one ranking rule
 * when the succeeded-runs stamp changes (ranking.repository). Returns false when the run was no longer running
 * (another attempt finished or failed it), and then changes nothing.
 *
 * A large run first refreshes room_results' statistics: its rows were all written since the table was last
 * analysed, and planning the switch on stale counts is what made it slow after a large import.
 */
export async function flipRunCurrent(db: Kysely<Database>, input: FlipInput, roomsWritten = 0): Promise<boolean> {
  if (roomsWritten >= ANALYZE_AFTER_ROWS) await sql`ANALYZE room_results`.execute(db);
  return db.transaction().execute(async (trx) => {
    // One flip at a time per trust, so two runs finishing together see each other's final state.
    await sql`SELECT pg_advisory_xact_lock(hashtext(${`assessment-flip:${input.trustId}`}))`.execute(trx);
    const run = await trx
      .selectFrom('assessment_runs')
      .select(['status', 'worker_id'])
      .where('id', '=', input.runId)
      .forUpdate()
      .executeTakeFirst();
    if (run?.status !== 'running' || run.worker_id !== input.workerId) return false;

    const inScope = input.schoolId === null ? sql`TRUE` : sql`school_id = ${input.schoolId}::uuid`;
    await sql`UPDATE room_results SET is_current = false
              WHERE is_current AND trust_id = ${input.trustId} AND ${inScope} AND run_id <> ${input.runId}::uuid`.execute(
      trx,
    );
    // Applied in the order the rows were written, so the heap and indexes are walked forward.
    await sql`UPDATE room_results SET is_current = true WHERE run_id = ${input.runId}::uuid AND NOT is_current`.execute(
      trx,
    );

    await trx
      .updateTable('assessment_runs')
      .set({
        status: 'succeeded',
        finished_at: new Date(),
        rooms_done: sql`GREATEST(rooms_done, rooms_total)`,
        error: null,
        worker_id: null,
        updated_at: new Date(),
      })
      .where('id', '=', input.runId)
      .execute();
    return true;
  });
}

/** Removes a failed run's rows: they never became current, so no view loses anything. */
export async function deleteNonCurrentResults(db: Kysely<Database>, runId: string): Promise<void> {
  await db.deleteFrom('room_results').where('run_id', '=', runId).where('is_current', '=', false).execute();
}
