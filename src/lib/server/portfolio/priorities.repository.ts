/** The priorities list: every current room result of the trust, ranked, filtered, sorted and paged in SQL. */
import { sql, type Kysely, type RawBuilder } from 'kysely';
import type { Database } from '../../../../db/database';
import { RISK_BAND_LABELS, riskBandOfNumber } from '../../engine/risk';
import type { ActiveTrust } from '../auth/context';
import type { PrioritiesQuery, PriorityFilter, PrioritySortKey } from './portfolio.schemas';
import type { PrioritiesPage, PriorityRow } from './portfolio.types';
import { ensureRanks, previewRanks, type RankState } from './ranking.repository';

/** Which ranks a read takes: the results stamp (cache keys) and the generation of portfolio_ranks. */
type Ranks = Pick<RankState, 'stamp' | 'generation'>;

/** The label of a stored band number (room_results.risk_band, 1 meets … 4 far over). */
export const bandLabel = (band: number) => RISK_BAND_LABELS[riskBandOfNumber(band)];

/** Sort keys as columns of the ranked set `pr` (portfolio_ranks or the preview ranking over it). */
const SORT_SQL: Record<PrioritySortKey, RawBuilder<unknown>> = {
  rank: sql`pr.rank`,
  school: sql`pr.school_name`,
  pupils: sql`pr.pupils`,
  meanCo2Ppm: sql`pr.mean_co2_ppm`,
  peakCo2Ppm: sql`pr.peak_co2_ppm`,
  riskBand: sql`pr.risk_band`,
  unitCount: sql`pr.unit_count`,
  capitalCostGbp: sql`pr.capital_cost_gbp`,
  simplePaybackYears: sql`pr.simple_payback_years`,
  npvGbp: sql`pr.npv_gbp`,
};

/** WHERE conditions on the ranked set `pr` for the trust, its ranks' generation, the member's schools and the filters. */
export function filterSql(trust: ActiveTrust, filter: PriorityFilter, generation: number) {
  const parts = [sql`pr.trust_id = ${trust.id}`, sql`pr.generation = ${generation}`];
  if (trust.schoolIds) parts.push(sql`pr.school_id = ANY(${trust.schoolIds}::uuid[])`);
  if (filter.schoolId) parts.push(sql`pr.school_id = ${filter.schoolId}::uuid`);
  if (filter.blockId) parts.push(sql`pr.block_id = ${filter.blockId}::uuid`);
  if (filter.band !== undefined) parts.push(sql`pr.risk_band = ${filter.band}`);
  if (filter.ventilationType) parts.push(sql`pr.ventilation_type = ${filter.ventilationType}`);
  if (filter.criteriaMet !== undefined) parts.push(sql`pr.criteria_met = ${filter.criteriaMet}`);
  return sql.join(parts, sql` AND `);
}

/**
 * The ranked rooms of the trust as `pr`: portfolio_ranks itself under the saved weights (indexed), or the same
 * rows with the places the engine's rule gives under preview weights. Either way a room's rank is its place in
 * the whole trust, computed by the one ranking rule.
 */
export function rankedSource(
  trust: ActiveTrust,
  generation: number,
  preview: { ids: string[]; ranks: number[]; scores: number[] } | null,
) {
  if (!preview) return sql`portfolio_ranks pr`;
  return sql`(
      SELECT p.*, v.rank AS preview_rank, v.score AS preview_score
      FROM portfolio_ranks p
        JOIN unnest(${preview.ids}::uuid[], ${preview.ranks}::int[], ${preview.scores}::float8[]) AS v(room_id, rank, score)
          ON v.room_id = p.room_id
      WHERE p.trust_id = ${trust.id} AND p.generation = ${generation}
    ) pr`;
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
  baseline: string | null;
  verdict: string | null;
  assumed_count: number;
  risk_evidence: PriorityRow['riskEvidence'];
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
  baseline: r.baseline,
  verdict: r.verdict,
  assumedCount: r.assumed_count,
  riskEvidence: r.risk_evidence,
});

/** Selects priority rows in the requested order; ranked set first (narrow), then the page's result rows. */
export async function selectPriorityRows(
  db: Kysely<Database>,
  trust: ActiveTrust,
  query: Omit<PrioritiesQuery, 'page' | 'pageSize'>,
  limit: number | null,
  offset: number,
  ranks: Ranks,
): Promise<PriorityRow[]> {
  const preview = query.weights ? await previewRanks(db, trust.id, ranks.stamp, query.weights) : null;
  const rank = preview ? sql`pr.preview_rank` : sql`pr.rank`;
  const score = preview ? sql`pr.preview_score` : sql`pr.score`;
  const dir = query.dir === 'desc' ? sql`DESC` : sql`ASC`;
  const sortKey = query.sort === 'rank' ? rank : SORT_SQL[query.sort];
  const order = query.sort === 'rank' ? sql`${rank} ${dir}` : sql`${sortKey} ${dir} NULLS LAST, ${rank} ASC`;
  const page = limit === null ? sql`` : sql`LIMIT ${limit} OFFSET ${offset}`;
  const result = await sql<Row>`
    WITH page AS (
      SELECT pr.room_id, pr.run_id, ${rank} AS rank, ${score} AS score, row_number() OVER (ORDER BY ${order}) AS position
      FROM (SELECT pr.* FROM ${rankedSource(trust, ranks.generation, preview)} WHERE ${filterSql(trust, query, ranks.generation)} ORDER BY ${order} ${page}) pr
    )
    SELECT rr.room_id, page.rank, page.score, rr.school_id, s.name AS school_name, rr.block_id, b.name AS block_name,
      r.code AS room_code, r.name AS room_name, rr.pupils, rr.ventilation_type, rr.worst_season, rr.mean_co2_ppm,
      rr.peak_co2_ppm, rr.criteria_met, rr.risk_band, rr.reason, rr.pupil_hours_above, rr.units_recommended,
      rr.unit_count, rr.capital_cost_gbp, rr.annual_saving_gbp, rr.simple_payback_years, rr.npv_gbp, rr.baseline,
      rr.verdict, rr.assumed_count, rr.risk_evidence
    FROM page
      JOIN room_results rr ON rr.run_id = page.run_id AND rr.room_id = page.room_id
      JOIN schools s ON s.id = rr.school_id
      JOIN rooms r ON r.id = rr.room_id
      LEFT JOIN blocks b ON b.id = rr.block_id
    ORDER BY page.position`.execute(db);
  return result.rows.map(toPriorityRow);
}

/** Counts survive until the trust's ranks are built again (their generation is part of the key). */
const countCache = new Map<string, number>();
const COUNT_CACHE_MAX = 500;

/** Number of ranked rooms matching the filters. */
export async function countPriorityRows(
  db: Kysely<Database>,
  trust: ActiveTrust,
  filter: PriorityFilter,
  ranks: Ranks,
): Promise<number> {
  const key = JSON.stringify([
    trust.id,
    trust.schoolIds,
    // A generation is one build of the ranks, from one results stamp: it names both.
    ranks.generation,
    filter.schoolId,
    filter.blockId,
    filter.band,
    filter.ventilationType,
    filter.criteriaMet,
  ]);
  const cached = countCache.get(key);
  if (cached !== undefined) return cached;
  const result = await sql<{
    n: number;
  }>`SELECT count(*)::int AS n FROM portfolio_ranks pr WHERE ${filterSql(trust, filter, ranks.generation)}`.execute(db);
  const n = result.rows[0]?.n ?? 0;
  if (countCache.size >= COUNT_CACHE_MAX) countCache.delete(countCache.keys().next().value!);
  countCache.set(key, n);
  return n;
}

/** One page of the priorities list. */
export async function listPriorities(
  db: Kysely<Database>,
  trust: ActiveTrust,
  query: PrioritiesQuery,
): Promise<PrioritiesPage> {
  const state = await ensureRanks(db, trust.id);
  const [rows, total] = await Promise.all([
    selectPriorityRows(db, trust, query, query.pageSize, (query.page - 1) * query.pageSize, state),
    countPriorityRows(db, trust, query, state),
  ]);
  return {
    rows,
    total,
    page: query.page,
    pageSize: query.pageSize,
    weights: query.weights ?? state.weights,
    preview: query.weights !== null,
  };
}
