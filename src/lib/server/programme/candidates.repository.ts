/**
 * The one place the capital programme reads the per-room appraisal: each room's candidate retrofit (units,
 * installed cost, benefit, savings, rank, risk) from the trust's current assessment results. When the
 * appraisal changes shape, only this adapter changes.
 */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { type MeasuredRoom, worstMeasuredSeasonMean } from '../../engine/measured';
import type { UnplannableRoom } from '../../engine/programme/report';
import type { ProgrammeCandidate } from '../../engine/programme/types';
import { ensureRanks } from '../portfolio/ranking.repository';

/** Which runs and assumption versions a snapshot of candidates came from. */
export interface CandidateSource {
  readAt: string;
  runs: { runId: string; assumptionsVersion: string | null; finishedAt: string | null }[];
  /** The assumption versions behind the results, newest run first. */
  assumptionsVersions: string[];
  /** The ranking weights the rank scores use. */
  weights: { risk: number; costEffectiveness: number; payback: number };
}

export interface CandidateSnapshot {
  candidates: ProgrammeCandidate[];
  unplannable: UnplannableRoom[];
  source: CandidateSource;
}

interface Row {
  room_id: string;
  room_code: string;
  room_name: string;
  school_id: string;
  school_name: string;
  block_id: string | null;
  block_name: string | null;
  run_id: string;
  unit_count: number;
  units_recommended: string;
  capital_cost_gbp: number | null;
  pupils: number;
  annual_saving_gbp: number | null;
  annual_saving_kgco2e: number | null;
  capital_per_tonne_co2e_gbp: number | null;
  risk_band: number;
  mean_co2_ppm: number;
  peak_co2_ppm: number;
  reason: string;
  criteria_met: boolean;
  rank: number | null;
  score: number;
  pupil_hours_removed: number | null;
  maintenance_gbp: number | null;
  installed_cost_gbp: number | null;
  life_years: number | null;
  measured: MeasuredRoom | null;
}

/** The units' life from the appraisal (null when it recommends none). */
function lifeYears(r: Row): number | null {
  return r.life_years !== null && r.life_years > 0 ? r.life_years : null;
}

/**
 * The trust's candidate rooms (current results with feasible units) and the failing rooms no catalogue unit
 * can fix, limited to `schoolIds` when given. Rooms are in room-id order.
 */
export async function readCandidates(
  db: Kysely<Database>,
  trustId: string,
  schoolIds: readonly string[] | null,
): Promise<CandidateSnapshot> {
  const state = await ensureRanks(db, trustId);
  const scope = schoolIds ? sql`AND rr.school_id = ANY(${[...schoolIds]}::uuid[])` : sql``;
  const result = await sql<Row>`
    SELECT rr.room_id, r.code AS room_code, r.name AS room_name, rr.school_id, s.name AS school_name, rr.block_id,
      b.name AS block_name, rr.run_id, rr.unit_count, rr.units_recommended, rr.capital_cost_gbp, rr.pupils,
      rr.annual_saving_gbp, rr.annual_saving_kgco2e, rr.capital_per_tonne_co2e_gbp, rr.risk_band, rr.mean_co2_ppm,
      rr.peak_co2_ppm, rr.reason, rr.criteria_met, pr.rank, coalesce(pr.score, 0)::float8 AS score,
      rr.pupil_hours_removed,
      -- The headline baseline's servicing line is a saving; the programme counts the units' extra servicing a year.
      -rr.annual_maintenance_saving_gbp AS maintenance_gbp,
      rr.installed_cost_gbp, rr.life_years,
      ma.result AS measured
    FROM current_room_results rr
      JOIN rooms r ON r.id = rr.room_id
      JOIN schools s ON s.id = rr.school_id
      LEFT JOIN blocks b ON b.id = rr.block_id
      LEFT JOIN portfolio_ranks pr
        ON pr.trust_id = rr.trust_id AND pr.room_id = rr.room_id AND pr.generation = ${state.generation}
      LEFT JOIN monitor_room_analyses ma ON ma.room_id = rr.room_id AND ma.trust_id = rr.trust_id
    WHERE rr.trust_id = ${trustId} ${scope}
    ORDER BY rr.room_id`.execute(db);

  const candidates: ProgrammeCandidate[] = [];
  const unplannable: UnplannableRoom[] = [];
  const runIds = new Set<string>();
  for (const r of result.rows) {
    runIds.add(r.run_id);
    if (r.unit_count > 0 && r.installed_cost_gbp !== null && r.installed_cost_gbp > 0) {
      candidates.push({
        roomId: r.room_id,
        roomCode: r.room_code,
        roomName: r.room_name,
        schoolId: r.school_id,
        schoolName: r.school_name,
        blockId: r.block_id,
        blockName: r.block_name,
        units: r.unit_count,
        unitsLabel: r.units_recommended,
        installedCostGbp: r.installed_cost_gbp,
        pupils: r.pupils,
        pupilHoursRemovedPerYear: Math.max(0, r.pupil_hours_removed ?? 0),
        rankScore: Math.max(0, r.score),
        rank: r.rank,
        riskBand: r.risk_band,
        annualSavingGbp: r.annual_saving_gbp ?? 0,
        annualMaintenanceGbp: r.maintenance_gbp ?? 0,
        annualSavingKgCo2e: r.annual_saving_kgco2e ?? 0,
        lifeYears: lifeYears(r),
        predictedMeanCo2Ppm: r.mean_co2_ppm,
        predictedPeakCo2Ppm: r.peak_co2_ppm,
        measuredMeanCo2Ppm: r.measured ? (worstMeasuredSeasonMean(r.measured)?.meanPpm ?? null) : null,
        riskReason: r.reason,
      });
    } else if (!r.criteria_met && r.unit_count === 0) {
      unplannable.push({
        roomId: r.room_id,
        roomCode: r.room_code,
        roomName: r.room_name,
        schoolId: r.school_id,
        schoolName: r.school_name,
        reason: r.units_recommended
          ? `Fails its criterion, but gets no units: ${r.units_recommended.replace(/^None: /, '')}.`
          : 'Fails its criterion, but the appraisal recommends no units for it.',
      });
    }
  }
  const runs =
    runIds.size === 0
      ? []
      : await db
          .selectFrom('assessment_runs')
          .select(['id', 'assumptions_version', 'finished_at'])
          .where('trust_id', '=', trustId)
          .where('id', 'in', [...runIds])
          .orderBy('finished_at', 'desc')
          .execute();
  return {
    candidates,
    unplannable,
    source: {
      readAt: new Date().toISOString(),
      runs: runs.map((run) => ({
        runId: run.id,
        assumptionsVersion: run.assumptions_version,
        finishedAt: run.finished_at ? new Date(run.finished_at).toISOString() : null,
      })),
      assumptionsVersions: [...new Set(runs.map((run) => run.assumptions_version).filter((v): v is string => !!v))],
      weights: state.weights,
    },
  };
}
