import type { ColumnType, Generated } from 'kysely';
import type { Json } from './json';

type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;

export interface AssessmentRunsTable {
  id: Generated<string>;
  trust_id: string;
  scope: 'trust' | 'school';
  school_id: string | null;
  status: Generated<'queued' | 'running' | 'succeeded' | 'failed'>;
  rooms_done: Generated<number>;
  rooms_total: Generated<number>;
  assumption_set_id: string | null;
  assumptions_version: string | null;
  started_by_user_id: string | null;
  started_by_email: string | null;
  error: string | null;
  created_at: Generated<Date>;
  started_at: Timestamp | null;
  finished_at: Timestamp | null;
}

/** One room's result in one run; `is_current` marks the result the views read. */
export interface RoomResultsTable {
  run_id: string;
  room_id: string;
  trust_id: string;
  school_id: string;
  block_id: string | null;
  ventilation_type: string;
  pupils: number;
  is_current: Generated<boolean>;
  worst_season: string;
  mean_co2_ppm: number;
  peak_co2_ppm: number;
  criteria_met: boolean;
  risk_band: number;
  risk_score: number;
  pupil_hours_above: number;
  reason: string;
  units_recommended: Generated<string>;
  unit_count: Generated<number>;
  capital_cost_gbp: number | null;
  annual_saving_gbp: number | null;
  annual_saving_kwh: number | null;
  annual_saving_kgco2e: number | null;
  simple_payback_years: number | null;
  discounted_payback_years: number | null;
  npv_gbp: number | null;
  pupil_hours_removed_per_1000_gbp: number | null;
  capital_per_tonne_co2e_gbp: number | null;
  score_risk: Generated<number>;
  score_cost_effectiveness: Generated<number>;
  score_payback: Generated<number>;
  rank: number | null;
  detail: Json<unknown>;
}

/** Tables of the assessments feature: add assumption sets and the unit catalogue here. */
export interface AssessmentsTables {
  assessment_runs: AssessmentRunsTable;
  room_results: RoomResultsTable;
}
