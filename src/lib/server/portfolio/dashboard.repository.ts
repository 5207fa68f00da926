/** The trust's headline figures and the data behind the dashboard's three charts. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import type { Co2BySchool, CumulativePoint, Dashboard, ScatterPoint } from './portfolio.types';
import { ensureRanks } from './ranking.repository';

/** Most points the scatter shows (the highest-ranked rooms with a retrofit); more would not be readable. */
export const SCATTER_MAX_POINTS = 1500;
/** Most points of the cumulative curve; the curve is sampled evenly along the ranked order. */
export const CUMULATIVE_MAX_POINTS = 200;

const scopeSql = (trust: ActiveTrust) =>
  trust.schoolIds
    ? sql`rr.trust_id = ${trust.id} AND rr.is_current AND rr.school_id = ANY(${trust.schoolIds}::uuid[])`
    : sql`rr.trust_id = ${trust.id} AND rr.is_current`;

/** The trust's headline figures: rooms, failing rooms and their pupils, capital and saving of every recommended unit. */
export async function headlineFigures(db: Kysely<Database>, trust: ActiveTrust): Promise<Dashboard['headline']> {
  const scope = scopeSql(trust);
  const roomScope = trust.schoolIds
    ? sql`s.trust_id = ${trust.id} AND s.id = ANY(${trust.schoolIds}::uuid[])`
    : sql`s.trust_id = ${trust.id}`;
  const retrofitted = sql`rr.unit_count > 0 AND rr.capital_cost_gbp IS NOT NULL`;
  const [headline, register, lastRun] = await Promise.all([
    sql<{
      assessed: number;
      failing: number;
      pupils_failing: number;
      capital: number;
      saving: number;
      baseline: string | null;
      measured: number;
      calibrated: number;
    }>`
      SELECT count(*)::int AS assessed, mode() WITHIN GROUP (ORDER BY rr.baseline) AS baseline,
        count(*) FILTER (WHERE rr.risk_evidence = 'measured')::int AS measured,
        count(*) FILTER (WHERE rr.risk_evidence = 'calibrated')::int AS calibrated,
        count(*) FILTER (WHERE NOT rr.criteria_met)::int AS failing,
        coalesce(sum(rr.pupils) FILTER (WHERE NOT rr.criteria_met), 0)::int AS pupils_failing,
        coalesce(sum(rr.capital_cost_gbp) FILTER (WHERE ${retrofitted}), 0)::float8 AS capital,
        coalesce(sum(rr.annual_saving_gbp) FILTER (WHERE ${retrofitted}), 0)::float8 AS saving
      FROM room_results rr WHERE ${scope}`.execute(db),
    sql<{
      n: number;
    }>`SELECT count(*)::int AS n FROM rooms r JOIN schools s ON s.id = r.school_id WHERE ${roomScope}`.execute(db),
    db
      .selectFrom('assessment_runs')
      .select('finished_at')
      .where('trust_id', '=', trust.id)
      .where('status', '=', 'succeeded')
      .orderBy('finished_at', 'desc')
      .limit(1)
      .executeTakeFirst(),
  ]);
  const h = headline.rows[0]!;
  return {
    roomsInRegister: register.rows[0]?.n ?? 0,
    roomsAssessed: h.assessed,
    roomsFailing: h.failing,
    pupilsInFailingRooms: h.pupils_failing,
    capitalAllUnitsGbp: h.capital,
    annualSavingGbp: h.saving,
    baseline: h.baseline,
    lastRunFinishedAt: lastRun?.finished_at ? new Date(lastRun.finished_at).toISOString() : null,
    evidence: { measured: h.measured, calibrated: h.calibrated, predicted: h.assessed - h.measured - h.calibrated },
  };
}

/** Everything the dashboard shows. */
export async function dashboard(db: Kysely<Database>, trust: ActiveTrust): Promise<Dashboard> {
  await ensureRanks(db, trust.id);
  const scope = scopeSql(trust);
  const retrofitted = sql`rr.unit_count > 0 AND rr.capital_cost_gbp IS NOT NULL`;

  const [headline, co2, scatter, scatterTotal, cumulative] = await Promise.all([
    headlineFigures(db, trust),
    sql<{ school_id: string; school_name: string; b1: number; b2: number; b3: number; b4: number }>`
      SELECT rr.school_id, s.name AS school_name,
        count(*) FILTER (WHERE rr.mean_co2_ppm < 1000)::int AS b1,
        count(*) FILTER (WHERE rr.mean_co2_ppm >= 1000 AND rr.mean_co2_ppm < 1500)::int AS b2,
        count(*) FILTER (WHERE rr.mean_co2_ppm >= 1500 AND rr.mean_co2_ppm < 2000)::int AS b3,
        count(*) FILTER (WHERE rr.mean_co2_ppm >= 2000)::int AS b4
      FROM room_results rr JOIN schools s ON s.id = rr.school_id
      WHERE ${scope}
      GROUP BY rr.school_id, s.name ORDER BY s.name`.execute(db),
    sql<{
      room_id: string;
      label: string;
      risk_score: number;
      simple_payback_years: number;
      capital_cost_gbp: number;
      risk_band: number;
    }>`
      SELECT rr.room_id, s.name || ' · ' || r.code AS label, rr.risk_score, rr.simple_payback_years, rr.capital_cost_gbp, rr.risk_band
      FROM room_results rr
        JOIN portfolio_ranks pr ON pr.trust_id = rr.trust_id AND pr.room_id = rr.room_id
        JOIN rooms r ON r.id = rr.room_id JOIN schools s ON s.id = rr.school_id
      WHERE ${scope} AND ${retrofitted} AND rr.simple_payback_years IS NOT NULL
      ORDER BY pr.rank LIMIT ${SCATTER_MAX_POINTS}`.execute(db),
    sql<{ n: number; never: number }>`SELECT count(*) FILTER (WHERE rr.simple_payback_years IS NOT NULL)::int AS n,
      count(*) FILTER (WHERE rr.simple_payback_years IS NULL)::int AS never
      FROM room_results rr WHERE ${scope} AND ${retrofitted}`.execute(db),
    sql<{ rank: number; cc: number; ch: number }>`
      WITH ordered AS (
        SELECT pr.rank,
          sum(rr.capital_cost_gbp) OVER w AS cc,
          sum(coalesce(rr.pupil_hours_removed_per_1000_gbp, 0) * rr.capital_cost_gbp / 1000) OVER w AS ch,
          row_number() OVER w AS rn, count(*) OVER () AS n
        FROM room_results rr JOIN portfolio_ranks pr ON pr.trust_id = rr.trust_id AND pr.room_id = rr.room_id
        WHERE ${scope} AND ${retrofitted}
        WINDOW w AS (ORDER BY pr.rank ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW)
      )
      SELECT rank, cc::float8 AS cc, ch::float8 AS ch FROM ordered
      WHERE rn % greatest(1, ceil(n / ${CUMULATIVE_MAX_POINTS}::float8))::int = 0 OR rn = n OR rn = 1
      ORDER BY rn`.execute(db),
  ]);

  const co2BySchool: Co2BySchool[] = co2.rows.map((r) => ({
    schoolId: r.school_id,
    schoolName: r.school_name,
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
  const curve: CumulativePoint[] = cumulative.rows.map((r) => ({
    rank: Number(r.rank),
    cumulativeCapitalGbp: r.cc,
    cumulativePupilHoursRemoved: r.ch,
  }));
  const last = curve[curve.length - 1];
  return {
    headline,
    co2BySchool,
    scatter: {
      points,
      totalWithRetrofit: scatterTotal.rows[0]?.n ?? 0,
      shown: points.length,
      neverPayBack: scatterTotal.rows[0]?.never ?? 0,
    },
    cumulative: {
      points: curve,
      totalCapitalGbp: last?.cumulativeCapitalGbp ?? 0,
      totalPupilHoursRemoved: last?.cumulativePupilHoursRemoved ?? 0,
    },
  };
}
