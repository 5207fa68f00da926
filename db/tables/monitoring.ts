import type { ColumnType, Generated } from 'kysely';
import type { Json } from './json';

type CreatedAt = ColumnType<Date, never, never>;
type UpdatedAt = ColumnType<Date, never, Date | undefined>;
type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;
type DateColumn = ColumnType<string, string, string>;

/** One uploaded monitor log: its detected layout, problems and status. */
export interface MonitorLogsTable {
  id: Generated<string>;
  trust_id: string;
  created_by_user_id: string | null;
  created_by_email: string | null;
  file_name: string;
  file_kind: 'csv' | 'xlsx';
  file_size_bytes: number;
  status: Generated<'previewed' | 'committed' | 'cancelled' | 'deleted'>;
  layout: Json<unknown>;
  time_basis: string;
  reading_count: Generated<number>;
  first_at: Timestamp | null;
  last_at: Timestamp | null;
  problems: Json<unknown>;
  outcome: Json<unknown> | null;
  committed_at: Timestamp | null;
  committed_by_email: string | null;
  deleted_at: Timestamp | null;
  deleted_by_email: string | null;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

/** One sensor (or wide column) of a log, and the room it is matched to. */
export interface MonitorLogSensorsTable {
  id: Generated<string>;
  log_id: string;
  trust_id: string;
  sensor_key: string;
  room_id: string | null;
  match: 'room_code' | 'remembered' | 'chosen' | 'unmatched' | 'ambiguous' | 'skipped';
  candidates: Json<unknown>;
  reading_count: number;
  day_count: number;
  first_at: Timestamp | null;
  last_at: Timestamp | null;
  interval_seconds: number | null;
  extras: Json<unknown>;
  problems: Json<unknown>;
}

/** One sensor-day of readings as packed arrays (see the migration for the encoding). */
export interface MonitorLogDaysTable {
  sensor_id: string;
  day: DateColumn;
  reading_count: number;
  times_s: Buffer;
  co2_ppm: Buffer;
  extras: Buffer | null;
}

/** The room a sensor name belongs to, remembered per trust. */
export interface MonitorSensorMappingsTable {
  trust_id: string;
  sensor_key: string;
  room_id: string;
  updated_by_email: string | null;
  updated_at: Generated<Date>;
}

/** Statistics of one room-day from all its committed readings. */
export interface MonitorRoomDaysTable {
  room_id: string;
  day: DateColumn;
  trust_id: string;
  season: string;
  reading_count: number;
  coverage: number;
  occupied: boolean;
  occupied_mean_ppm: number | null;
  min_ppm: number;
  max_ppm: number;
  night_min_ppm: number | null;
  thresholds_ppm: number[];
  minutes_over: number[];
  longest_run_minutes: number[];
}

/** One room's measured picture per season (the engine's MeasuredRoom as JSON). */
export interface MonitorRoomAnalysesTable {
  room_id: string;
  trust_id: string;
  school_id: string;
  days: number;
  first_date: DateColumn | null;
  last_date: DateColumn | null;
  result: Json<unknown>;
  criterion_pack_id: string;
  assumptions_version: string;
  analysed_at: Generated<Date>;
}

/** An analysis of a trust's logs (all rooms, or the rooms a log touched) with its progress. */
export interface MonitorAnalysisRunsTable {
  id: Generated<string>;
  trust_id: string;
  status: Generated<'queued' | 'running' | 'succeeded' | 'failed'>;
  room_ids: string[] | null;
  rooms_total: Generated<number>;
  rooms_done: Generated<number>;
  error: string | null;
  created_by_email: string | null;
  created_at: Generated<Date>;
  finished_at: Timestamp | null;
}

/** One version of a room's calibration from measured CO2. */
export interface RoomCalibrationsTable {
  id: Generated<string>;
  trust_id: string;
  room_id: string;
  version: number;
  status: Generated<'active' | 'reverted' | 'superseded'>;
  days_used: number;
  label: string;
  calibration: Json<unknown>;
  fit: Json<unknown>;
  assumptions_version: string;
  created_by_email: string | null;
  created_at: Generated<Date>;
  ended_at: Timestamp | null;
  ended_by_email: string | null;
}

/** Tables of the measured-CO2 feature: monitor logs, their analysis, and room calibrations. */
export interface MonitoringTables {
  monitor_logs: MonitorLogsTable;
  monitor_log_sensors: MonitorLogSensorsTable;
  monitor_log_days: MonitorLogDaysTable;
  monitor_sensor_mappings: MonitorSensorMappingsTable;
  monitor_room_days: MonitorRoomDaysTable;
  monitor_room_analyses: MonitorRoomAnalysesTable;
  monitor_analysis_runs: MonitorAnalysisRunsTable;
  room_calibrations: RoomCalibrationsTable;
}
