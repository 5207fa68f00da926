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
} from '../../engine/vocabulary';

/** A school with its headline counts, as the estate overview lists it. */
export interface SchoolSummary {
  id: string;
  name: string;
  referenceNumber: string | null;
  phase: SchoolPhase;
  climateRegion: ClimateRegion;
  address: string | null;
  blockCount: number;
  roomCount: number;
  pupilCount: number;
}

export interface School extends SchoolSummary {
  heatingFuel: HeatingFuel;
  fuelPriceGbpPerKwh: number | null;
  /** Seasonal efficiency (seasonal COP for heat pumps, 1 for direct electric); null: the trust's default. */
  heatingEfficiency: number | null;
  /** The school's own day as editor lines; '' when the assumption set's timetable applies. */
  timetableText: string;
  blocks: Block[];
}

export interface Block {
  id: string;
  schoolId: string;
  name: string;
  yearBuilt: number | null;
  constructionType: ConstructionType | null;
  airPermeabilityM3hM2: number | null;
  heatingType: HeatingType | null;
  heatingFuel: HeatingFuel | null;
  fuelPriceGbpPerKwh: number | null;
  heatingEfficiency: number | null;
  heatingInstalledYear: number | null;
  roomCount: number;
}

export interface Room {
  id: string;
  schoolId: string;
  schoolName: string;
  blockId: string | null;
  blockName: string | null;
  code: string;
  name: string;
  use: RoomUse | null;
  floorAreaM2: number;
  ceilingHeightM: number | null;
  pupils: number | null;
  adults: number | null;
  ageGroup: AgeGroup | null;
  orientationDeg: number | null;
  glazingAreaM2: number | null;
  openableAreaM2: number | null;
  windowType: WindowType | null;
  frameMaterial: FrameMaterial | null;
  glazingGValue: number | null;
  ventilationType: VentilationType | null;
  mechanicalSupplyLps: number | null;
  winterWindowOpenFraction: number | null;
  notes: string | null;
  updatedAt: string;
}

export interface Page<T> {
  rows: T[];
  total: number;
  page: number;
  pageSize: number;
}
