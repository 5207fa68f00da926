import type { TimetableSegment } from '../../engine';
import type { ClimateRegion, ConstructionType, HeatingFuel, HeatingType, SchoolPhase } from '../../engine/vocabulary';
import type { RoomFields } from './estate.schemas';

export type { RoomFields };

/** Some of T's fields; an undefined field is left as it is. */
export type Some<T> = { [K in keyof T]?: T[K] | undefined };

/** A school's own attributes, as stored (one row of `schools`). */
export interface SchoolRecord {
  id: string;
  name: string;
  referenceNumber: string | null;
  phase: SchoolPhase;
  climateRegion: ClimateRegion;
  address: string | null;
  heatingFuel: HeatingFuel;
  fuelPriceGbpPerKwh: number | null;
  /** Seasonal efficiency (seasonal COP for heat pumps, 1 for direct electric); null: the trust's default. */
  heatingEfficiency: number | null;
  /** The school's own day; null when the assumption set's timetable applies. */
  timetable: readonly TimetableSegment[] | null;
}

/** The school attributes a write may set (everything but the id). */
export type SchoolFields = Omit<SchoolRecord, 'id'>;

/** A school with its headline counts, as the estate overview lists it. */
export interface SchoolSummary
  extends Pick<SchoolRecord, 'id' | 'name' | 'referenceNumber' | 'phase' | 'climateRegion' | 'address'> {
  blockCount: number;
  roomCount: number;
  pupilCount: number;
}

/** One school with its heating, timetable (as editor lines) and blocks, as the school page and API show it. */
export interface School
  extends SchoolSummary,
    Pick<SchoolRecord, 'heatingFuel' | 'fuelPriceGbpPerKwh' | 'heatingEfficiency'> {
  /** The school's own day as editor lines; '' when the assumption set's timetable applies. */
  timetableText: string;
  blocks: Block[];
}

/** A block's own attributes, as stored (one row of `blocks`). */
export interface BlockRecord {
  id: string;
  schoolId: string;
  name: string;
  yearBuilt: number | null;
  constructionType: ConstructionType | null;
  airPermeabilityM3hM2: number | null;
  heatingType: HeatingType | null;
  /** Null: the school's fuel. */
  heatingFuel: HeatingFuel | null;
  fuelPriceGbpPerKwh: number | null;
  heatingEfficiency: number | null;
  heatingInstalledYear: number | null;
}

/** The block attributes a write may set. */
export type BlockFields = Omit<BlockRecord, 'id' | 'schoolId'>;

/** A block with its room count, as the school page lists it. */
export interface Block extends BlockRecord {
  roomCount: number;
}

/** A room as stored: its place and its own attributes. */
export interface RoomRecord {
  id: string;
  schoolId: string;
  blockId: string | null;
  fields: RoomFields;
}

/** A room with every attribute and the names of its school and block, as lists and the room page show it. */
export interface Room extends RoomFields {
  id: string;
  schoolId: string;
  schoolName: string;
  blockId: string | null;
  blockName: string | null;
  updatedAt: string;
}

/** A room with its school and block as they are (the register export's row). */
export interface PlacedRoom {
  school: SchoolRecord;
  block: BlockRecord | null;
  room: RoomFields;
}

/** A school and its blocks by name, for filters and pickers. */
export interface SchoolOption {
  id: string;
  name: string;
  blocks: { id: string; name: string }[];
}

/** The trust's estate as stored, every record once (what an import compares against). */
export interface EstateRecords {
  schools: SchoolRecord[];
  blocks: BlockRecord[];
  rooms: RoomRecord[];
}

export interface Page<T> {
  rows: T[];
  total: number;
  page: number;
  pageSize: number;
}
