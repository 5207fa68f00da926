import type { ColumnType, Generated } from 'kysely';
import type {
  AgeGroup,
  ClimateRegion,
  ConstructionType,
  FrameMaterial,
  HeatingFuel,
  HeatingType,
  RoomUse,
  SchoolPhase,
  VentilationType,
  WindowType,
} from '../../src/lib/engine/vocabulary';
import type { Json } from './json';

/** Timestamps are written by Postgres defaults and triggers, read as Date. */
type CreatedAt = ColumnType<Date, never, never>;
type UpdatedAt = ColumnType<Date, never, Date | undefined>;

export interface TrustsTable {
  id: string;
  name: string;
  slug: string;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

export interface SchoolsTable {
  id: Generated<string>;
  trust_id: string;
  name: string;
  reference_number: string | null;
  phase: SchoolPhase;
  climate_region: ClimateRegion;
  address: string | null;
  timetable: Json<unknown> | null;
  heating_fuel: Generated<HeatingFuel>;
  fuel_price_gbp_per_kwh: number | null;
  /** Seasonal efficiency of the school's heating (seasonal COP for heat pumps, 1 for direct electric). */
  heating_efficiency: number | null;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

export interface BlocksTable {
  id: Generated<string>;
  school_id: string;
  name: string;
  year_built: number | null;
  construction_type: ConstructionType | null;
  air_permeability_m3h_m2: number | null;
  heating_type: HeatingType | null;
  heating_fuel: HeatingFuel | null;
  fuel_price_gbp_per_kwh: number | null;
  heating_efficiency: number | null;
  heating_installed_year: number | null;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

/** Room columns; a null is an unknown value the engine assumes (and says so). Enumerations are CHECKed in the migrations. */
export interface RoomsTable {
  id: Generated<string>;
  school_id: string;
  block_id: string | null;
  code: string;
  name: Generated<string>;
  use: RoomUse | null;
  floor_area_m2: number;
  ceiling_height_m: number | null;
  pupils: number | null;
  adults: number | null;
  age_group: AgeGroup | null;
  orientation_deg: number | null;
  glazing_area_m2: number | null;
  openable_area_m2: number | null;
  window_type: WindowType | null;
  frame_material: FrameMaterial | null;
  glazing_g_value: number | null;
  ventilation_type: VentilationType | null;
  mechanical_supply_lps: number | null;
  winter_window_open_fraction: number | null;
  notes: string | null;
  created_at: CreatedAt;
  updated_at: UpdatedAt;
}

export interface AuditEventsTable {
  id: Generated<string>;
  trust_id: string | null;
  actor_user_id: string | null;
  actor_email: string | null;
  action: string;
  entity_type: string;
  entity_id: string | null;
  summary: Generated<string>;
  before: Json<unknown> | null;
  after: Json<unknown> | null;
  created_at: CreatedAt;
}

/** Tables of the estate feature. */
/** Each school's number of rooms in the register (kept by triggers on rooms; no row yet: none). */
export interface SchoolRoomCountsTable {
  school_id: string;
  trust_id: string;
  rooms: number;
}

export interface EstateTables {
  trusts: TrustsTable;
  schools: SchoolsTable;
  blocks: BlocksTable;
  rooms: RoomsTable;
  school_room_counts: SchoolRoomCountsTable;
  audit_events: AuditEventsTable;
}
