import { sql, type Kysely, type Transaction } from 'kysely';
import type pg from 'pg';
import { pipeline } from 'node:stream/promises';
import { Readable } from 'node:stream';
import copyStreams from 'pg-copy-streams';
import type { Database } from '../../../../db/database';
import type { RankInput, RankedRow } from '../../engine';
import type { RunProblem } from '../../../../db/tables/assessments';
import { RISK_BANDS_BY_NUMBER, type ResultRow } from './result-row';

const COPY_COLUMNS = [
  'run_id', 'room_id', 'trust_id', 'school_id', 'block_id', 'ventilation_type', 'pupils', 'is_current', 'worst_season',
  'mean_co2_ppm', 'peak_co2_ppm', 'criteria_met', 'risk_band', 'risk_score', 'pupil_hours_above', 'reason',
  'units_recommended', 'unit_count', 'capital_cost_gbp', 'annual_saving_gbp', 'annual_saving_kwh', 'annual_saving_kgco2e',
  'simple_payback_years', 'discounted_payback_years', 'npv_gbp', 'pupil_hours_removed_per_1000_gbp',
  'capital_per_tonne_co2e_gbp', 'detail',
] as const;

/** The COPY statement for result rows (also used by the benchmark's I/O floor). */
export const copyResultsSql = (table = 'room_results') => `COPY ${table} (${COPY_COLUMNS.join(', ')}) FROM STDIN`;

/** A value in COPY text format: backslash, tab, newline and carriage return escaped; null as \N. */
function field(value: string | number | boolean | null): string {
  if (value === null) return '\\N';
  if (typeof value === 'boolean') return value ? 't' : 'f';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '\\N';
  if (!/[\\\t\n\r]/.test(value)) return value;
  return value.replace(/[\\\t\n\r]/g, (c) => (c === '\\' ? '\\\\' : c === '\t' ? '\\t' : c === '\n' ? '\\n' : '\\r'));
}

/** One result row as a line of COPY text, not yet current. */
export function toCopyLine(r: ResultRow): string {
  return [
    r.runId, r.roomId, r.trustId, r.schoolId, r.blockId, r.ventilationType, r.pupils, false, r.worstSeason,
    r.meanCo2Ppm, r.peakCo2Ppm, r.criteriaMet, r.riskBand, r.riskScore, r.pupilHoursAbove, r.reason,
    r.unitsRecommended, r.unitCount, r.capitalCostGbp, r.annualSavingGbp, r.annualSavingKwh, r.annualSavingKgCo2e,
    r.simplePaybackYears, r.discountedPaybackYears, r.npvGbp, r.pupilHoursRemovedPer1000Gbp,
    r.capitalPerTonneCo2eGbp, r.detailJson,
  ].map(field).join('\t') + '\n';
}

/** Streams COPY text lines into `copySql` on a client that is already inside a transaction. */
export async function copyLines(client: pg.PoolClient, copySql: string, lines: Iterable<string>): Promise<void> {
  const target = client.query(copyStreams.from(copySql));
  await pipeline(Readable.from(lines), target);
}

/** Result rows as COPY lines, made one at a time as the stream asks for them. */
function* copyLinesOf(rows: ResultRow[]): Generator<string> {
  for (const row of rows) yield toCopyLine(row);
}

/**
 * Commits one chunk: its result rows (not current) and the run's progress, in one transaction, so a crash
 * leaves either the whole chunk or none of it and the resume point always matches what is written.
 */
export async function commitChunk(
  pool: pg.Pool,
  runId: string,
  rows: ResultRow[],
  chunk: { roomsDone: number; lastRoomId: string; problems: RunProblem[] },
): Promise<void> {
  const client = await pool.connect();
  try {
    await client.query('BEGIN');
    if (rows.length > 0) await copyLines(client, copyResultsSql(), copyLinesOf(rows));
    await client.query(
      `UPDATE assessment_runs SET rooms_done = rooms_done + $2, rooms_total = GREATEST(rooms_total, rooms_done + $2),
         resume_after_room_id = $3, problems = problems || $4::jsonb, updated_at = now()
       WHERE id = $1`,
      [runId, chunk.roomsDone, chunk.lastRoomId, JSON.stringify(chunk.problems)],
    );
    await client.query('COMMIT');
  } catch (error) {
    await client.query('ROLLBACK').catch(() => undefined);
    throw error;
  } finally {
    client.release();
  }
}

/** Rank inputs rebuilt from stored result rows (for rows written by an earlier attempt or another run). */
async function loadRankInputs(trx: Transaction<Database>, where: ReturnType<typeof sql>): Promise<RankInput[]> {
  const { rows } = await sql<{
    room_id: string;
    run_id: string;
    code: string;
    pupils: number;
    risk_score: number;
    risk_band: number;
    pupil_hours_above: number;
    threshold_ppm: number | null;
    criteria_met: boolean;
    unit_count: number;
    pupil_hours_removed_per_1000_gbp: number | null;
    simple_payback_years: number | null;
    capital_cost_gbp: number | null;
    has_retrofit: boolean;
  }>`
    SELECT r.room_id, r.run_id, rooms.code, r.pupils, r.risk_score, r.risk_band, r.pupil_hours_above,
      (r.detail->'risk'->>'thresholdPpm')::float8 AS threshold_ppm, r.criteria_met, r.unit_count,
      r.pupil_hours_removed_per_1000_gbp, r.simple_payback_years, r.capital_cost_gbp,
      (r.detail->'retrofit') IS NOT NULL AND (r.detail->'retrofit') <> 'null'::jsonb AS has_retrofit
    FROM room_results r JOIN rooms ON rooms.id = r.room_id
    WHERE ${where}`.execute(trx);
  return rows.map((r) => ({
    roomId: `${r.run_id}:${r.room_id}`,
    roomCode: r.code,
    pupils: r.pupils,
    riskScore: r.risk_score,
    riskBand: RISK_BANDS_BY_NUMBER[r.risk_band - 1] ?? 'fresh',
    pupilHoursPerYearAbove: r.pupil_hours_above,
    thresholdPpm: r.threshold_ppm ?? 0,
    criteriaMet: r.criteria_met,
    hasRetrofit: r.has_retrofit,
    pupilHoursRemovedPer1000Gbp: r.pupil_hours_removed_per_1000_gbp,
    simplePaybackYears: r.simple_payback_years,
    capitalCostGbp: r.capital_cost_gbp,
  }));
}

export interface FlipInput {
  runId: string;
  trustId: string;
  schoolId: string | null;
  /** Rank inputs of this run's rooms assessed in this attempt; their roomId is `${runId}:${roomId}`. */
  rankInputs: RankInput[];
  /** Set when this attempt resumed a run: rows up to this room id were written by an earlier attempt. */
  resumedAfterRoomId: string | null;
  rank: (rows: RankInput[]) => RankedRow[];
}

/**
 * Makes the run's results the current ones in ONE transaction: older current results of the rooms in scope
 * stop being current, this run's become current, and every current result of the trust is re-ranked with
 * the default weights. Views therefore never see a mix of two runs of the same rooms. Returns false when
 * the run was no longer running (another attempt finished or failed it), and then changes nothing.
 */
export async function flipRunCurrent(db: Kysely<Database>, input: FlipInput): Promise<boolean> {
  return db.transaction().execute(async (trx) => {
    // One flip at a time per trust, so two runs finishing together rank against each other's final state.
    await sql`SELECT pg_advisory_xact_lock(hashtext(${`assessment-flip:${input.trustId}`}))`.execute(trx);
    const run = await trx.selectFrom('assessment_runs').select('status').where('id', '=', input.runId).forUpdate().executeTakeFirst();
    if (run?.status !== 'running') return false;

    const inScope = input.schoolId === null ? sql`TRUE` : sql`school_id = ${input.schoolId}::uuid`;
    await sql`UPDATE room_results SET is_current = false
              WHERE is_current AND trust_id = ${input.trustId} AND ${inScope} AND run_id <> ${input.runId}::uuid`.execute(trx);

    const others = await loadRankInputs(trx, sql`r.is_current AND r.trust_id = ${input.trustId} AND r.run_id <> ${input.runId}::uuid`);
    const resumed =
      input.resumedAfterRoomId === null
        ? []
        : await loadRankInputs(trx, sql`r.run_id = ${input.runId}::uuid AND r.room_id <= ${input.resumedAfterRoomId}::uuid`);
    const ranked = input.rank([...input.rankInputs, ...resumed, ...others]);

    const runIds: string[] = [];
    const roomIds: string[] = [];
    const ranks: number[] = [];
    const risk: number[] = [];
    const costEffectiveness: number[] = [];
    const payback: number[] = [];
    for (const row of ranked) {
      const [runId, roomId] = row.roomId.split(':') as [string, string];
      runIds.push(runId);
      roomIds.push(roomId);
      ranks.push(row.rank);
      risk.push(row.parts.risk);
      costEffectiveness.push(row.parts.costEffectiveness);
      payback.push(row.parts.payback);
    }
    await sql`
      UPDATE room_results r SET is_current = true, rank = v.rank, score_risk = v.risk,
        score_cost_effectiveness = v.cost_effectiveness, score_payback = v.payback
      FROM unnest(${runIds}::uuid[], ${roomIds}::uuid[], ${ranks}::int[], ${risk}::float8[], ${costEffectiveness}::float8[], ${payback}::float8[])
        AS v(run_id, room_id, rank, risk, cost_effectiveness, payback)
      WHERE r.run_id = v.run_id AND r.room_id = v.room_id`.execute(trx);

    await trx
      .updateTable('assessment_runs')
      .set({ status: 'succeeded', finished_at: new Date(), rooms_done: sql`GREATEST(rooms_done, rooms_total)`, error: null, updated_at: new Date() })
      .where('id', '=', input.runId)
      .execute();
    return true;
  });
}

/** Removes a failed run's rows: they never became current, so no view loses anything. */
export async function deleteNonCurrentResults(db: Kysely<Database>, runId: string): Promise<void> {
  await db.deleteFrom('room_results').where('run_id', '=', runId).where('is_current', '=', false).execute();
}
