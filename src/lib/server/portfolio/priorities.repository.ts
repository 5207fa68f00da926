/** The priorities list: every current room result of the trust, ranked, filtered, sorted and paged in SQL. */
import { sql, type Kysely, type RawBuilder } from 'kysely';
import type { Database } from '../../../../db/database';
import { RISK_BAND_LABELS } from '../../engine/risk';
import type { RiskBand } from '../../engine/types';
import type { ActiveTrust } from '../auth/context';
import type { PrioritiesQuery, PriorityFilter, PrioritySortKey, Weights } from './portfolio.schemas';
import type { PrioritiesPage, PriorityRow } from './portfolio.types';
import { ensureRanks, rankOrderSql, weightedScoreSql } from './ranking.repository';

/** room_results.risk_band (1–4) to the engine's band names, least concern first. */
export const BAND_BY_NUMBER: Record<number, RiskBand> = { 1: 'fresh', 2: 'stuffy', 3: 'stale', 4: 'very_stale' };
export const bandLabel = (band: number) => RISK_BAND_LABELS[BAND_BY_NUMBER[band] ?? 'fresh'];

const SORT_SQL: Record<PrioritySortKey, RawBuilder<unknown>> = {
  rank: sql`pr.rank`,
  school: sql`s.name`,
  pupils: sql`rr.pupils`,
  meanCo2Ppm: sql`rr.mean_co2_ppm`,
  peakCo2Ppm: sql`rr.peak_co2_ppm`,
  riskBand: sql`rr.risk_band`,
  unitCount: sql`rr.unit_count`,
  capitalCostGbp: sql`rr.capital_cost_gbp`,
  simplePaybackYears: sql`rr.simple_payback_years`,
  npvGbp: sql`rr.npv_gbp`,
};

/** WHERE conditions on room_results (alias rr) for the trust, the member's schools and the filters. */
export function filterSql(trust: ActiveTrust, filter: PriorityFilter, schoolColumn = sql`rr.school_id`) {
  const parts = [sql`rr.trust_id = ${trust.id}`, sql`rr.is_current`];
  if (trust.schoolIds) parts.push(sql`rr.school_id = ANY(${trust.schoolIds}::uuid[])`);
  if (filter.schoolId) parts.push(sql`${schoolColumn} = ${filter.schoolId}::uuid`);
  if (filter.blockId) parts.push(sql`rr.block_id = ${filter.blockId}::uuid`);
  if (filter.band !== undefined) parts.push(sql`rr.risk_band = ${filter.band}`);
  if (filter.ventilationType) parts.push(sql`rr.ventilation_type = ${filter.ventilationType}`);
  if (filter.criteriaMet !== undefined) parts.push(sql`rr.criteria_met = ${filter.criteriaMet}`);
  return sql.join(parts, sql` AND `);
}

/**
 * The ranked rooms of the trust: with the saved weights through portfolio_ranks (indexed), with preview
 * weights ranked on the fly. Either way a room's rank is its place in the whole trust.
 */
export function rankedSource(trust: ActiveTrust, preview: Weights | null) {
  if (!preview) {
    return sql`room_results rr JOIN portfolio_ranks pr ON pr.trust_id = rr.trust_id AND pr.room_id = rr.room_id`;
  }
  return sql`room_results rr JOIN (
      SELECT rr.room_id, row_number() OVER (ORDER BY ${rankOrderSql(preview)})::int AS rank, ${weightedScoreSql(preview)} AS score
      FROM room_results rr WHERE rr.trust_id = ${trust.id} AND rr.is_current
    ) pr ON pr.room_id = rr.room_id`;
}

interface Row {
  room_id: string;
  rank: number;
  score: number;
  school_id: string;
  school_name: string;
  block_id: string | null;
  block_name: string | null;
  room_code: string;
  room_name: string;
  pupils: number;
  ventilation_type: string;
  worst_season: string;
  mean_co2_ppm: number;
  peak_co2_ppm: number;
  criteria_met: boolean;
  risk_band: number;
  reason: string;
  pupil_hours_above: number;
  units_recommended: string;
  unit_count: number;
  capital_cost_gbp: number | null;
  annual_saving_gbp: number | null;
  simple_payback_years: number | null;
  npv_gbp: number | null;
}

const toPriorityRow = (r: Row): PriorityRow => ({
  roomId: r.room_id,
  rank: Number(r.rank),
  score: r.score,
  schoolId: r.school_id,
  schoolName: r.school_name,
  blockId: r.block_id,
  blockName: r.block_name,
  roomCode: r.room_code,
  roomName: r.room_name,
  pupils: r.pupils,
  ventilationType: r.ventilation_type,
  worstSeason: r.worst_season,
  meanCo2Ppm: r.mean_co2_ppm,
  peakCo2Ppm: r.peak_co2_ppm,
  criteriaMet: r.criteria_met,
  riskBand: r.risk_band,
  riskBandLabel: bandLabel(r.risk_band),
  reason: r.reason,
  pupilHoursAbove: r.pupil_hours_above,
  unitsRecommended: r.units_recommended,
  unitCount: r.unit_count,
  capitalCostGbp: r.capital_cost_gbp,
  annualSavingGbp: r.annual_saving_gbp,
  simplePaybackYears: r.simple_payback_years,
  npvGbp: r.npv_gbp,
});

/** Selects priority rows in the requested order; `limit` null = all (exports). */
export async function selectPriorityRows(
  db: Kysely<Database>,
  trust: ActiveTrust,
  query: Omit<PrioritiesQuery, 'page' | 'pageSize'>,
  limit: number | null,
  offset: number,
): Promise<PriorityRow[]> {
  const preview = query.weights;
  const schoolColumn = preview ? sql`rr.school_id` : sql`pr.school_id`;
  const dir = query.dir === 'desc' ? sql`DESC` : sql`ASC`;
  const order = query.sort === 'rank' ? sql`pr.rank ${dir}` : sql`${SORT_SQL[query.sort]} ${dir} NULLS LAST, pr.rank ASC`;
  const page = limit === null ? sql`` : sql`LIMIT ${limit} OFFSET ${offset}`;
  const result = await sql<Row>`
    SELECT rr.room_id, pr.rank, pr.score, rr.school_id, s.name AS school_name, rr.block_id, b.name AS block_name,
      r.code AS room_code, r.name AS room_name, rr.pupils, rr.ventilation_type, rr.worst_season, rr.mean_co2_ppm,
      rr.peak_co2_ppm, rr.criteria_met, rr.risk_band, rr.reason, rr.pupil_hours_above, rr.units_recommended,
      rr.unit_count, rr.capital_cost_gbp, rr.annual_saving_gbp, rr.simple_payback_years, rr.npv_gbp
    FROM ${rankedSource(trust, preview)}
      JOIN schools s ON s.id = rr.school_id
      JOIN rooms r ON r.id = rr.room_id
      LEFT JOIN blocks b ON b.id = rr.block_id
    WHERE ${filterSql(trust, query, schoolColumn)}
    ORDER BY ${order}
    ${page}`.execute(db);
  return result.rows.map(toPriorityRow);
}

/** Number of current room results matching the filters. */
export async function countPriorityRows(db: Kysely<Database>, trust: ActiveTrust, filter: PriorityFilter): Promise<number> {
  const result = await sql<{ n: number }>`SELECT count(*)::int AS n FROM room_results rr WHERE ${filterSql(trust, filter)}`.execute(db);
  return result.rows[0]?.n ?? 0;
}

/** One page of the priorities list. */
export async function listPriorities(db: Kysely<Database>, trust: ActiveTrust, query: PrioritiesQuery): Promise<PrioritiesPage> {
  const weights = query.weights ?? (await ensureRanks(db, trust.id));
  const [rows, total] = await Promise.all([
    selectPriorityRows(db, trust, query, query.pageSize, (query.page - 1) * query.pageSize),
    countPriorityRows(db, trust, query),
  ]);
  return { rows, total, page: query.page, pageSize: query.pageSize, weights, preview: query.weights !== null };
}
