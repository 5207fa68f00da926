import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { RoomAssessmentInput } from '../../engine';
import type { MeasuredRoom } from '../../engine/measured';
import { attachMeasuredEvidence } from '../monitor-logs/evidence.repository';

/** A room of the register as the engine reads it, with the ids a result row needs. */
export interface EngineRoom {
  roomId: string;
  roomCode: string;
  trustId: string;
  schoolId: string;
  blockId: string | null;
  input: RoomAssessmentInput;
  /** Register gaps filled in here (not by the engine), reported with the result. */
  defaultsUsed: string[];
  /** The room's measured-CO2 analysis, when it has readings (the calibration travels in `input`). */
  measured?: MeasuredRoom | null;
}

/** Which rooms a run covers. */
export type RoomScope = { trustId: string; schoolId: string | null };

const COLUMNS = sql`
  rooms.id, rooms.code, rooms.name, rooms.use, rooms.floor_area_m2, rooms.ceiling_height_m, rooms.pupils, rooms.adults,
  rooms.age_group, rooms.orientation_deg, rooms.glazing_area_m2, rooms.openable_area_m2, rooms.window_type,
  rooms.glazing_g_value, rooms.ventilation_type, rooms.mechanical_supply_lps, rooms.block_id,
  schools.id AS school_id, schools.trust_id, schools.phase, schools.climate_region, schools.heating_fuel AS school_fuel,
  schools.fuel_price_gbp_per_kwh, schools.boiler_efficiency,
  blocks.year_built, blocks.construction_type, blocks.air_permeability_m3h_m2, blocks.heating_fuel AS block_fuel,
  blocks.heating_installed_year`;

interface JoinedRow {
  id: string;
  code: string;
  name: string;
  use: string;
  floor_area_m2: number;
  ceiling_height_m: number;
  pupils: number;
  adults: number;
  age_group: string;
  orientation_deg: number | null;
  glazing_area_m2: number;
  openable_area_m2: number;
  window_type: string | null;
  glazing_g_value: number | null;
  ventilation_type: string;
  mechanical_supply_lps: number | null;
  block_id: string | null;
  school_id: string;
  trust_id: string;
  phase: string;
  climate_region: string;
  school_fuel: string;
  fuel_price_gbp_per_kwh: number | null;
  boiler_efficiency: number | null;
  year_built: number | null;
  construction_type: string | null;
  air_permeability_m3h_m2: number | null;
  block_fuel: string | null;
  heating_installed_year: number | null;
}

/** The register's columns mapped once onto the engine's input (same meanings, camelCase). */
function toEngineRoom(r: JoinedRow): EngineRoom {
  const defaultsUsed: string[] = [];
  // The register allows an unrecorded window type; the engine needs one. Side-hung casements are the
  // commonest classroom window, so they stand in and the result says so.
  const windowType = (r.window_type ?? 'side_hung') as RoomAssessmentInput['room']['windowType'];
  if (r.window_type === null) defaultsUsed.push('room.windowType → side-hung (not recorded in the register)');
  return {
    roomId: r.id,
    roomCode: r.code,
    trustId: r.trust_id,
    schoolId: r.school_id,
    blockId: r.block_id,
    defaultsUsed,
    input: {
      room: {
        code: r.code,
        name: r.name,
        use: r.use as RoomAssessmentInput['room']['use'],
        floorAreaM2: r.floor_area_m2,
        ceilingHeightM: r.ceiling_height_m,
        pupils: r.pupils,
        adults: r.adults,
        ageGroup: r.age_group as RoomAssessmentInput['room']['ageGroup'],
        orientationDeg: r.orientation_deg,
        glazingAreaM2: r.glazing_area_m2,
        openableAreaM2: r.openable_area_m2,
        windowType,
        glazingGValue: r.glazing_g_value,
        ventilationType: r.ventilation_type as RoomAssessmentInput['room']['ventilationType'],
        mechanicalSupplyLps: r.mechanical_supply_lps,
      },
      block: {
        yearBuilt: r.year_built,
        constructionType: r.construction_type as RoomAssessmentInput['block']['constructionType'],
        airPermeabilityM3hM2: r.air_permeability_m3h_m2,
        heatingFuel: r.block_fuel as RoomAssessmentInput['block']['heatingFuel'],
        heatingInstalledYear: r.heating_installed_year,
      },
      school: {
        phase: r.phase as RoomAssessmentInput['school']['phase'],
        climateRegion: r.climate_region as RoomAssessmentInput['school']['climateRegion'],
        heatingFuel: r.school_fuel as RoomAssessmentInput['school']['heatingFuel'],
        fuelPriceGbpPerKwh: r.fuel_price_gbp_per_kwh,
        boilerEfficiency: r.boiler_efficiency,
      },
    },
  };
}

const scopeWhere = (scope: RoomScope) =>
  scope.schoolId === null
    ? sql`schools.trust_id = ${scope.trustId}`
    : sql`schools.trust_id = ${scope.trustId} AND schools.id = ${scope.schoolId}`;

/** The next chunk of rooms in id order after `afterRoomId` (keyset paging, so a resumed run carries on where it stopped). */
export async function readRoomChunk(
  db: Kysely<Database>,
  scope: RoomScope,
  afterRoomId: string | null,
  limit: number,
): Promise<EngineRoom[]> {
  const after = afterRoomId === null ? sql`TRUE` : sql`rooms.id > ${afterRoomId}::uuid`;
  const { rows } = await sql<JoinedRow>`
    SELECT ${COLUMNS}
    FROM rooms JOIN schools ON schools.id = rooms.school_id LEFT JOIN blocks ON blocks.id = rooms.block_id
    WHERE ${scopeWhere(scope)} AND ${after}
    ORDER BY rooms.id
    LIMIT ${limit}`.execute(db);
  return attachMeasuredEvidence(db, rows.map(toEngineRoom));
}

/**
 * The next chunk of a run's rooms (its snapshot, in id order) after `afterRoomId`: the rooms still in the
 * register, the last snapshot id read (the resume point, even when that room has been deleted since) and
 * how many snapshot entries the chunk covered.
 */
export async function readRunChunk(
  db: Kysely<Database>,
  runId: string,
  afterRoomId: string | null,
  limit: number,
): Promise<{ rooms: EngineRoom[]; lastRoomId: string | null; covered: number }> {
  const after = afterRoomId === null ? sql`TRUE` : sql`room_id > ${afterRoomId}::uuid`;
  const { rows } = await sql<JoinedRow & { snapshot_id: string }>`
    WITH ids AS (
      SELECT room_id FROM assessment_run_rooms WHERE run_id = ${runId}::uuid AND ${after} ORDER BY room_id LIMIT ${limit}
    )
    SELECT ids.room_id AS snapshot_id, ${COLUMNS}
    FROM ids LEFT JOIN rooms ON rooms.id = ids.room_id
      LEFT JOIN schools ON schools.id = rooms.school_id LEFT JOIN blocks ON blocks.id = rooms.block_id
    ORDER BY ids.room_id`.execute(db);
  return {
    rooms: rows.filter((r) => r.id !== null).map(toEngineRoom),
    lastRoomId: rows[rows.length - 1]?.snapshot_id ?? null,
    covered: rows.length,
  };
}

/** One room of the trust (null when it is not in the trust or outside a school-limited member's schools). */
export async function readEngineRoom(
  db: Kysely<Database>,
  trustId: string,
  schoolIds: string[] | null,
  roomId: string,
): Promise<EngineRoom | null> {
  const limited = schoolIds === null ? sql`TRUE` : sql`schools.id = ANY(${schoolIds}::uuid[])`;
  const { rows } = await sql<JoinedRow>`
    SELECT ${COLUMNS}
    FROM rooms JOIN schools ON schools.id = rooms.school_id LEFT JOIN blocks ON blocks.id = rooms.block_id
    WHERE schools.trust_id = ${trustId} AND ${limited} AND rooms.id = ${roomId}::uuid`.execute(db);
  return rows[0] ? ((await attachMeasuredEvidence(db, [toEngineRoom(rows[0])]))[0] ?? null) : null;
}
