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
  /** The pg-boss job working the run (to tell a crashed worker from a slow one). */
  job_id: string | null;
  /** Last room (in id order) of the last committed chunk: a resumed run carries on after it. */
  resume_after_room_id: string | null;
  /** Rooms the engine could not assess: [{ roomId, roomCode, field, message }]. */
  problems: ColumnType<RunProblem[], string | undefined, string>;
  updated_at: Generated<Date>;
  /** When the worker working the run last said it was alive. */
  heartbeat_at: Timestamp | null;
  /** The worker working the run: host/process id/boot nonce (see run-executor.ts). */
  worker_id: string | null;
  /** How many times a worker has started (or resumed) the run. */
  attempts: Generated<number>;
}

/** The rooms a run assesses, fixed when it starts. */
export interface AssessmentRunRoomsTable {
  run_id: string;
  room_id: string;
}

/** A room a run skipped, with the engine's reason. */
export interface RunProblem {
  roomId: string;
  roomCode: string;
  field: string;
  message: string;
}

/** One version of a trust's assumption set; the unit catalogue is part of `values`. Never updated, only added. */
export interface AssumptionSetsTable {
  id: Generated<string>;
  trust_id: string;
  /** 1, 2, 3 … within the trust. */
  version: number;
  /** The version string the engine records in each result, e.g. 'airtally-default-2026.1+trust.3'. */
  label: string;
  /** The full AssumptionSet JSON. */
  values: Json<unknown>;
  change_summary: Generated<string>;
  created_by_user_id: string | null;
  created_by_email: string | null;
  created_at: Generated<Date>;
}

/** One room's result in one run; `is_current` marks the result the views read. Ranks live in portfolio_ranks. */
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
  /** The baseline the money columns are against (assumptions.finance.headlineBaseline of the run). */
  baseline: string | null;
  verdict: string | null;
  annual_heating_saving_kwh: number | null;
  annual_fan_saving_kwh: number | null;
  annual_maintenance_saving_gbp: number | null;
  replacement_cost_gbp: number | null;
  /** Pupil-hours a year of poor air the units remove against today. */
  pupil_hours_removed: number | null;
  heating_fuel: string | null;
  fuel_price_gbp_per_kwh: number | null;
  heating_efficiency: number | null;
  price_source: string | null;
  efficiency_source: string | null;
  heating_degree_hours_kh: number | null;
  unit_run_hours: number | null;
  assumed_count: Generated<number>;
  detail: Json<unknown>;
  /** What the risk rests on: 'measured' readings, the 'calibrated' model, or the model's prediction. */
  risk_evidence: Generated<'measured' | 'calibrated' | 'predicted'>;
}

/** Tables of the assessments feature: runs, per-room results and versioned assumption sets. */
export interface AssessmentsTables {
  assessment_runs: AssessmentRunsTable;
  assessment_run_rooms: AssessmentRunRoomsTable;
  room_results: RoomResultsTable;
  assumption_sets: AssumptionSetsTable;
}
