import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { RoomAssessmentInput, TimetableSegment } from '../../engine';
import type { MeasuredRoom } from '../../engine/measured';
import { parseStoredTimetable } from '../estate/timetable';
import { attachMeasuredEvidence } from '../monitor-logs/evidence.repository';

/** A room of the register as the engine reads it, with the ids a result row needs. */
export interface EngineRoom {
  roomId: string;
  roomCode: string;
  trustId: string;
  schoolId: string;
  blockId: string | null;
  input: RoomAssessmentInput;
  /** The room's measured-CO2 analysis, when it has readings (the calibration travels in `input`). */
  measured?: MeasuredRoom | null;
}

/** Which rooms a run covers. */
export type RoomScope = { trustId: string; schoolId: string | null };

const COLUMNS = sql`
  rooms.id, rooms.code, rooms.name, rooms.use, rooms.floor_area_m2, rooms.ceiling_height_m, rooms.pupils, rooms.adults,
  rooms.age_group, rooms.orientation_deg, rooms.glazing_area_m2, rooms.openable_area_m2, rooms.window_type,
  rooms.frame_material, rooms.glazing_g_value, rooms.ventilation_type, rooms.mechanical_supply_lps,
  rooms.winter_window_open_fraction, rooms.block_id,
  schools.id AS school_id, schools.trust_id, schools.phase, schools.climate_region, schools.heating_fuel AS school_fuel,
  schools.fuel_price_gbp_per_kwh AS school_price, schools.heating_efficiency AS school_efficiency, schools.timetable,
  blocks.year_built, blocks.construction_type, blocks.air_permeability_m3h_m2, blocks.heating_fuel AS block_fuel,
  blocks.fuel_price_gbp_per_kwh AS block_price, blocks.heating_efficiency AS block_efficiency, blocks.heating_installed_year`;

interface JoinedRow {
  id: string;
  code: string;
  name: string;
  use: string | null;
  floor_area_m2: number;
  ceiling_height_m: number | null;
  pupils: number | null;
  adults: number | null;
  age_group: string | null;
  orientation_deg: number | null;
  glazing_area_m2: number | null;
  openable_area_m2: number | null;
  window_type: string | null;
  frame_material: string | null;
  glazing_g_value: number | null;
  ventilation_type: string | null;
  mechanical_supply_lps: number | null;
  winter_window_open_fraction: number | null;
  block_id: string | null;
  school_id: string;
  trust_id: string;
  phase: string;
  climate_region: string;
  school_fuel: string;
  school_price: number | null;
  school_efficiency: number | null;
  timetable: unknown;
  year_built: number | null;
  construction_type: string | null;
  air_permeability_m3h_m2: number | null;
  block_fuel: string | null;
  block_price: number | null;
  block_efficiency: number | null;
  heating_installed_year: number | null;
}

type Input = RoomAssessmentInput;

/** One parsed timetable object per school, so the engine derives each school's hours once. */
type TimetableCache = Map<string, readonly TimetableSegment[] | null>;

/** The register's columns mapped once onto the engine's input (same meanings, camelCase; nulls stay unknown). */
function toEngineRoom(r: JoinedRow, timetables: TimetableCache): EngineRoom {
  let timetable = timetables.get(r.school_id);
  if (timetable === undefined) {
    timetable = parseStoredTimetable(r.timetable);
    timetables.set(r.school_id, timetable);
  }
  return {
    roomId: r.id,
    roomCode: r.code,
    trustId: r.trust_id,
    schoolId: r.school_id,
    blockId: r.block_id,
    input: {
      room: {
        code: r.code,
        name: r.name,
        use: r.use as Input['room']['use'],
        floorAreaM2: r.floor_area_m2,
        ceilingHeightM: r.ceiling_height_m,
        pupils: r.pupils,
        adults: r.adults,
        ageGroup: r.age_group as Input['room']['ageGroup'],
        orientationDeg: r.orientation_deg,
        glazingAreaM2: r.glazing_area_m2,
        openableAreaM2: r.openable_area_m2,
        windowType: r.window_type as Input['room']['windowType'],
        frameMaterial: r.frame_material as Input['room']['frameMaterial'],
        glazingGValue: r.glazing_g_value,
        ventilationType: r.ventilation_type as Input['room']['ventilationType'],
        mechanicalSupplyLps: r.mechanical_supply_lps,
        winterWindowOpenFraction: r.winter_window_open_fraction,
      },
      block: {
        yearBuilt: r.year_built,
        constructionType: r.construction_type as Input['block']['constructionType'],
        airPermeabilityM3hM2: r.air_permeability_m3h_m2,
        heatingFuel: r.block_fuel as Input['block']['heatingFuel'],
        fuelPriceGbpPerKwh: r.block_price,
        heatingEfficiency: r.block_efficiency,
        heatingInstalledYear: r.heating_installed_year,
      },
      school: {
        phase: r.phase as Input['school']['phase'],
        climateRegion: r.climate_region as Input['school']['climateRegion'],
        heatingFuel: r.school_fuel as Input['school']['heatingFuel'],
        fuelPriceGbpPerKwh: r.school_price,
        heatingEfficiency: r.school_efficiency,
        timetable,
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
  const timetables: TimetableCache = new Map();
  return attachMeasuredEvidence(
    db,
    rows.map((r) => toEngineRoom(r, timetables)),
  );
}

/**
 * The rooms of a chunk of a run (its snapshot rooms after `afterRoomId` up to `lastRoomId`, in id order) that are
 * still in the register; a room deleted since the run started is skipped.
 */
export async function readChunkRooms(
  db: Kysely<Database>,
  chunk: { runId: string; afterRoomId: string | null; lastRoomId: string },
): Promise<EngineRoom[]> {
  const after = chunk.afterRoomId === null ? sql`TRUE` : sql`ids.room_id > ${chunk.afterRoomId}::uuid`;
  const { rows } = await sql<JoinedRow>`
    SELECT ${COLUMNS}
    FROM assessment_run_rooms ids JOIN rooms ON rooms.id = ids.room_id
      JOIN schools ON schools.id = rooms.school_id LEFT JOIN blocks ON blocks.id = rooms.block_id
    WHERE ids.run_id = ${chunk.runId}::uuid AND ${after} AND ids.room_id <= ${chunk.lastRoomId}::uuid
    ORDER BY ids.room_id`.execute(db);
  const timetables: TimetableCache = new Map();
  // Each room's calibration and measured analysis travel with it, as in readRoomChunk.
  return attachMeasuredEvidence(
    db,
    rows.map((r) => toEngineRoom(r, timetables)),
  );
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
  return rows[0] ? ((await attachMeasuredEvidence(db, [toEngineRoom(rows[0], new Map())]))[0] ?? null) : null;
}
