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
  /** Rooms the engine could not assess: [{ roomId, roomCode, field, message }]. */
  problems: ColumnType<RunProblem[], string | undefined, string>;
  updated_at: Generated<Date>;
  /** When a worker last claimed or committed a chunk of the run. */
  heartbeat_at: Timestamp | null;
  /** Chunks the run is split into, and how many are committed. */
  chunks_total: Generated<number>;
  chunks_done: Generated<number>;
  /** When the retention rule removed the run's results (the run itself stays in the history). */
  results_pruned_at: Timestamp | null;
}

/** One chunk of a run: a range of its snapshot rooms, worked by one worker at a time. */
export interface AssessmentRunChunksTable {
  run_id: string;
  chunk_no: number;
  /** The chunk's rooms lie in after_room_id < id <= last_room_id (null: from the first). */
  after_room_id: string | null;
  last_room_id: string;
  rooms: number;
  /** The ids of the rooms the chunk covers, fixed when the run started, in id order (the run's snapshot). */
  room_ids: string[];
  status: Generated<'pending' | 'running' | 'done'>;
  /** The worker working it: host/process id/boot nonce (see run-executor.ts). */
  worker_id: string | null;
  heartbeat_at: Timestamp | null;
  /** How many times a worker has claimed it. */
  attempts: Generated<number>;
  /** Result rows written when done. */
  results: number | null;
  /** The engine inputs the chunk read, gzip'd JSON (input-snapshot.ts). */
  inputs: Buffer | null;
  done_at: Timestamp | null;
}

/** Each school's current results: those of one run. */
export interface AssessmentCurrentTable {
  school_id: string;
  trust_id: string;
  run_id: string;
}

/** Per trust: how many succeeded runs keep their results. */
export interface AssessmentSettingsTable {
  trust_id: string;
  keep_runs: number;
  updated_at: Generated<Date>;
  updated_by_email: string | null;
}

/** A run's dashboard figures per school, computed when it finishes (refresh_run_school_summaries). */
export interface RunSchoolSummariesTable {
  run_id: string;
  school_id: string;
  assessed: number;
  failing: number;
  pupils_failing: number;
  retrofitted: number;
  retrofitted_never_pay_back: number;
  capital_gbp: number;
  saving_gbp: number;
  measured: number;
  calibrated: number;
  co2_below_1000: number;
  co2_1000_1500: number;
  co2_1500_2000: number;
  co2_above_2000: number;
  baseline_today: number;
  baseline_same_air: number;
  baseline_simpler: number;
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

/**
 * One room's result in one run: numbers and codes only (the detail is recomputed from the chunk's inputs). Which
 * results are current is assessment_current; ranks live in portfolio_ranks.
 */
export interface RoomResultsTable {
  run_id: string;
  room_id: string;
  school_id: string;
  block_id: string | null;
  ventilation_type: string;
  pupils: number;
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
  /** The recommended units' full installed cost and life (the capital programme's figures). */
  installed_cost_gbp: number | null;
  life_years: number | null;
  /** The recommended units as JSON [[count, model name], …]. */
  unit_lines: string | null;
  /** What the risk rests on: 'measured' readings, the 'calibrated' model, or the model's prediction. */
  risk_evidence: Generated<'measured' | 'calibrated' | 'predicted'>;
}

/** current_room_results (a view): each school's current results, with the trust. */
export interface CurrentRoomResultsView extends RoomResultsTable {
  trust_id: string;
}

/** Tables of the assessments feature: runs and their chunks, per-room results and versioned assumption sets. */
export interface AssessmentsTables {
  assessment_runs: AssessmentRunsTable;
  assessment_run_chunks: AssessmentRunChunksTable;
  assessment_current: AssessmentCurrentTable;
  assessment_settings: AssessmentSettingsTable;
  room_results: RoomResultsTable;
  current_room_results: CurrentRoomResultsView;
  run_school_summaries: RunSchoolSummariesTable;
  assumption_sets: AssumptionSetsTable;
}
