import type { ColumnType } from 'kysely';
import type { Json } from './json';

type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;

/** Per trust: the saved ranking weights (null = engine defaults) and what the ranks were built from. */
export interface PortfolioSettingsTable {
  trust_id: string;
  weight_risk: number | null;
  weight_cost_effectiveness: number | null;
  weight_payback: number | null;
  weights_saved_at: Timestamp | null;
  weights_saved_by_email: string | null;
  ranked_weights: Json<unknown> | null;
  ranked_stamp: string | null;
  /** The generation of portfolio_ranks readers use (a rebuild writes the next beside it, then switches). */
  ranked_generation: number | null;
  ranked_at: Timestamp | null;
  /** The cumulative capital and pupil-hours curve along the ranked order, sampled (the dashboard's chart). */
  ranked_curve: Json<unknown> | null;
}

/** Each current room's place in its trust under the trust's weights (1 = do first). */
export interface PortfolioRanksTable {
  trust_id: string;
  /** Which rebuild wrote the row; readers take the trust's ranked_generation. */
  generation: number;
  room_id: string;
  school_id: string;
  /** The run of the room's current result (room_results is read through its key). */
  run_id: string;
  rank: number;
  score: number;
  /** Filter and sort keys copied from room_results when the ranks are built. */
  block_id: string | null;
  school_name: string | null;
  ventilation_type: string | null;
  risk_band: number | null;
  criteria_met: boolean | null;
  pupils: number | null;
  mean_co2_ppm: number | null;
  peak_co2_ppm: number | null;
  unit_count: number | null;
  capital_cost_gbp: number | null;
  simple_payback_years: number | null;
  npv_gbp: number | null;
  pupil_hours_above: number | null;
  score_risk: number | null;
  score_cost_effectiveness: number | null;
  score_payback: number | null;
  pupil_hours_removed: number | null;
}

/** One rebuild of a trust's ranks: the generation of portfolio_ranks it writes, recorded before its rows. */
export interface PortfolioRankBuildsTable {
  generation: ColumnType<number, number | undefined, never>;
  trust_id: string;
  started_at: Timestamp;
}

/** Tables of the saved ranking weights and other portfolio settings feature. */
export interface PortfolioTables {
  portfolio_settings: PortfolioSettingsTable;
  portfolio_ranks: PortfolioRanksTable;
  portfolio_rank_builds: PortfolioRankBuildsTable;
  /** The ranks of each trust's current generation (reports and checks; the app's reads name the generation). */
  current_portfolio_ranks: PortfolioRanksTable;
}
