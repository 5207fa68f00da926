/** The trust's headline figures and the data behind the dashboard's three charts. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import type { Co2BySchool, Dashboard, ScatterPoint } from './portfolio.types';
import { cumulativeCurve, ensureRanks, storedCurve } from './ranking.repository';

/** Most points the scatter shows (the highest-ranked rooms with a retrofit); more would not be readable. */
export const SCATTER_MAX_POINTS = 1500;

/**
 * Most schools the CO2 chart shows a bar each; beyond that, the schools with the most rooms at 1,500 ppm or more get
 * theirs and the others share one bar (a chart of 22,000 schools is not readable, nor light to send).
 */
export const CO2_MAX_SCHOOLS = 30;

/** Each school's current run's figures (run_school_summaries `rs`). */
const SUMMARIES = sql`run_school_summaries rs
  JOIN assessment_current ac ON ac.run_id = rs.run_id AND ac.school_id = rs.school_id`;

/** The member's schools' summaries. */
const inScope = (trust: ActiveTrust) =>
  trust.schoolIds
    ? sql`ac.trust_id = ${trust.id} AND ac.school_id = ANY(${trust.schoolIds}::uuid[])`
    : sql`ac.trust_id = ${trust.id}`;

/** The baseline most of the rooms' figures are against (ties go to the first name in alphabetical order, as mode() does). */
function mostCommonBaseline(counts: Record<string, number>): string | null {
  let best: string | null = null;
  for (const [baseline, n] of Object.entries(counts).sort(([a], [b]) => a.localeCompare(b)))
    if (n > 0 && (best === null || n > (counts[best] ?? 0))) best = baseline;
  return best;
}

/**
 * The trust's headline figures: rooms, failing rooms and their pupils, capital and saving of every recommended unit.
 * Summed from each school's current run's figures, computed once when the run finished.
 */
export async function headlineFigures(
  db: Kysely<Database>,
  trust: ActiveTrust,
  sums?: HeadlineSums,
): Promise<Dashboard['headline']> {
  const roomScope = trust.schoolIds
    ? sql`c.trust_id = ${trust.id} AND c.school_id = ANY(${trust.schoolIds}::uuid[])`
    : sql`c.trust_id = ${trust.id}`;
  const [h, register, lastRun] = await Promise.all([
    sums ?? headlineSums(db, trust),
    // Kept per school by triggers on rooms: a sum over the schools, not a count of every room.
    sql<{
      n: number;
    }>`SELECT coalesce(sum(c.rooms), 0)::int AS n FROM school_room_counts c WHERE ${roomScope}`.execute(db),
    db
      .selectFrom('assessment_runs')
      .select('finished_at')
      .where('trust_id', '=', trust.id)
      .where('status', '=', 'succeeded')
      .orderBy('finished_at', 'desc')
      .limit(1)
      .executeTakeFirst(),
  ]);
  return {
    roomsInRegister: register.rows[0]?.n ?? 0,
    roomsAssessed: h.assessed,
    roomsFailing: h.failing,
    pupilsInFailingRooms: h.pupils_failing,
    capitalAllUnitsGbp: h.capital,
    annualSavingGbp: h.saving,
    baseline: mostCommonBaseline({
      today: h.today,
      same_air_without_recovery: h.same_air,
      simpler_option: h.simpler,
    }),
    lastRunFinishedAt: lastRun?.finished_at ? new Date(lastRun.finished_at).toISOString() : null,
    evidence: { measured: h.measured, calibrated: h.calibrated, predicted: h.assessed - h.measured - h.calibrated },
  };
}

/** The member's schools' current-run figures summed. */
interface HeadlineSums {
  assessed: number;
  failing: number;
  pupils_failing: number;
  capital: number;
  saving: number;
  measured: number;
  calibrated: number;
  today: number;
  same_air: number;
  simpler: number;
}

async function headlineSums(db: Kysely<Database>, trust: ActiveTrust): Promise<HeadlineSums> {
  const { rows } = await sql<HeadlineSums>`
      SELECT coalesce(sum(rs.assessed), 0)::int AS assessed, coalesce(sum(rs.failing), 0)::int AS failing,
        coalesce(sum(rs.pupils_failing), 0)::int AS pupils_failing, coalesce(sum(rs.capital_gbp), 0)::float8 AS capital,
        coalesce(sum(rs.saving_gbp), 0)::float8 AS saving, coalesce(sum(rs.measured), 0)::int AS measured,
        coalesce(sum(rs.calibrated), 0)::int AS calibrated, coalesce(sum(rs.baseline_today), 0)::int AS today,
        coalesce(sum(rs.baseline_same_air), 0)::int AS same_air, coalesce(sum(rs.baseline_simpler), 0)::int AS simpler
      FROM ${SUMMARIES} WHERE ${inScope(trust)}`.execute(db);
  return rows[0]!;
}

/**
 * Everything the dashboard shows. Aggregates come from each school's current run's figures and the curve from the
 * ranking (both computed once, when a run finishes or the ranks change), so a 550,000-room estate answers as fast as
 * a small one; the scatter reads the top ranks through portfolio_ranks' index.
 */
export async function dashboard(db: Kysely<Database>, trust: ActiveTrust): Promise<Dashboard> {
  const ranks = await ensureRanks(db, trust.id);
  // A generation is one build of the ranks, from one results stamp: it names both.
  const key = JSON.stringify([trust.id, trust.schoolIds, ranks.generation]);
  let figures = figuresCache.get(key);
  if (!figures) {
    figures = resultFigures(db, trust, ranks.generation);
    if (figuresCache.size >= FIGURES_CACHE_MAX) figuresCache.delete(figuresCache.keys().next().value!);
    figuresCache.set(key, figures);
    figures.catch(() => figuresCache.delete(key));
  }
  const { sums, ...rest } = await figures;
  return { headline: await headlineFigures(db, trust, sums), ...rest };
}

/**
 * What the dashboard computes from the current results and ranks, kept per process for each results stamp and
 * ranks generation (a run, new weights or a deleted room or school makes a new one): 20 people opening a national
 * estate's dashboard at once then cost one computation, not twenty.
 */
const figuresCache = new Map<string, Promise<Omit<Dashboard, 'headline'> & { sums: HeadlineSums }>>();
const FIGURES_CACHE_MAX = 200;

async function resultFigures(
  db: Kysely<Database>,
  trust: ActiveTrust,
  generation: number,
): Promise<Omit<Dashboard, 'headline'> & { sums: HeadlineSums }> {
  const limited = trust.schoolIds ? sql`AND pr.school_id = ANY(${trust.schoolIds}::uuid[])` : sql``;
  const [sums, co2, scatter, curve] = await Promise.all([
    headlineSums(db, trust),
    sql<{
      school_id: string | null;
      school_name: string | null;
      schools: number;
      b1: number;
      b2: number;
      b3: number;
      b4: number;
      rf: number;
      nv: number;
    }>`
      WITH per AS (
        SELECT rs.school_id, s.name AS school_name, rs.co2_below_1000 AS b1, rs.co2_1000_1500 AS b2,
          rs.co2_1500_2000 AS b3, rs.co2_above_2000 AS b4, rs.retrofitted AS rf, rs.retrofitted_never_pay_back AS nv,
          row_number() OVER (ORDER BY rs.co2_1500_2000 + rs.co2_above_2000 DESC, rs.co2_above_2000 DESC, s.name, rs.school_id)
            AS worst
        FROM ${SUMMARIES} JOIN schools s ON s.id = rs.school_id
        WHERE ${inScope(trust)} AND rs.assessed > 0
      )
      SELECT CASE WHEN worst <= ${CO2_MAX_SCHOOLS} THEN school_id END AS school_id,
        CASE WHEN worst <= ${CO2_MAX_SCHOOLS} THEN school_name END AS school_name, count(*)::int AS schools,
        sum(b1)::int AS b1, sum(b2)::int AS b2, sum(b3)::int AS b3, sum(b4)::int AS b4, sum(rf)::int AS rf, sum(nv)::int AS nv
      FROM per GROUP BY 1, 2
      ORDER BY 1 IS NULL, 2`.execute(db),
    sql<{
      room_id: string;
      label: string;
      risk_score: number;
      simple_payback_years: number;
      capital_cost_gbp: number;
      risk_band: number;
    }>`
      SELECT pr.room_id, s.name || ' · ' || r.code AS label, rr.risk_score, pr.simple_payback_years,
        pr.capital_cost_gbp, pr.risk_band
      FROM portfolio_ranks pr
        JOIN room_results rr ON rr.run_id = pr.run_id AND rr.room_id = pr.room_id
        JOIN rooms r ON r.id = pr.room_id JOIN schools s ON s.id = pr.school_id
      WHERE pr.trust_id = ${trust.id} AND pr.generation = ${generation} ${limited} AND pr.unit_count > 0 AND pr.capital_cost_gbp IS NOT NULL
        AND pr.simple_payback_years IS NOT NULL
      ORDER BY pr.rank LIMIT ${SCATTER_MAX_POINTS}`.execute(db),
    trust.schoolIds ? cumulativeCurve(db, trust.id, trust.schoolIds, generation) : storedCurve(db, trust.id),
  ]);

  const co2BySchool: Co2BySchool[] = co2.rows.map((r) => ({
    schoolId: r.school_id,
    schoolName: r.school_name ?? `The other ${r.schools.toLocaleString('en-GB')} schools`,
    below1000: r.b1,
    from1000to1500: r.b2,
    from1500to2000: r.b3,
    above2000: r.b4,
  }));
  const points: ScatterPoint[] = scatter.rows.map((r) => ({
    roomId: r.room_id,
    label: r.label,
    riskScore: r.risk_score,
    simplePaybackYears: r.simple_payback_years,
    capitalCostGbp: r.capital_cost_gbp,
    riskBand: r.risk_band,
  }));
  const last = curve[curve.length - 1];
  return {
    sums,
    co2BySchool,
    co2Schools: {
      total: co2.rows.reduce((sum, r) => sum + r.schools, 0),
      ownBar: co2.rows.filter((r) => r.school_id).length,
    },
    scatter: {
      points,
      totalWithRetrofit: co2.rows.reduce((sum, r) => sum + r.rf - r.nv, 0),
      shown: points.length,
      neverPayBack: co2.rows.reduce((sum, r) => sum + r.nv, 0),
    },
    cumulative: {
      points: curve,
      totalCapitalGbp: last?.cumulativeCapitalGbp ?? 0,
      totalPupilHoursRemoved: last?.cumulativePupilHoursRemoved ?? 0,
    },
  };
}
