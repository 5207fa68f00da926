import type {
  AgeGroup,
  ClimateRegion,
  ConstructionType,
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
  boilerEfficiency: number | null;
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
  use: RoomUse;
  floorAreaM2: number;
  ceilingHeightM: number;
  pupils: number;
  adults: number;
  ageGroup: AgeGroup;
  orientationDeg: number | null;
  glazingAreaM2: number;
  openableAreaM2: number;
  windowType: WindowType | null;
  glazingGValue: number | null;
  ventilationType: VentilationType;
  mechanicalSupplyLps: number | null;
  notes: string | null;
  updatedAt: string;
}

export interface Page<T> {
  rows: T[];
  total: number;
  page: number;
  pageSize: number;
}
