/**
 * The public contract of the Airtally assessment engine: what goes in, what comes out.
 * Everything here is plain data (JSON-serialisable); the engine never does I/O.
 * Units live in the field names (Lps = litres per second, Ppm = parts per million by volume,
 * M2 = square metres, C = degrees Celsius, Kwh = kilowatt-hours, Gbp = pounds sterling).
 */
import type {
  AgeGroup,
  ClimateRegion,
  ConstructionType,
  HeatingFuel,
  RoomUse,
  SchoolPhase,
  VentilationType,
  WindowType,
} from './vocabulary';
import type { EvidenceSummary } from './measured/evidence';

/** The vocabulary types, re-exported for callers of the engine. */
export type {
  AgeGroup,
  ClimateRegion,
  ConstructionType,
  HeatingFuel,
  RoomUse,
  SchoolPhase,
  VentilationType,
  WindowType,
} from './vocabulary';

// ---------------------------------------------------------------------------------------------
// Input
// ---------------------------------------------------------------------------------------------

/** One room as the register holds it. Nulls fall back to assumption-set defaults (see each field). */
export interface RoomInput {
  code: string;
  name: string;
  use: RoomUse;
  /** 1–2,000 m². */
  floorAreaM2: number;
  /** 2–15 m. */
  ceilingHeightM: number;
  /** 0–500 pupils at design occupancy. */
  pupils: number;
  /** 0–50 adults at design occupancy. */
  adults: number;
  ageGroup: AgeGroup;
  /** Bearing of the main glazed façade, 0 = north, clockwise, 0–360. Null: summer solar gain uses the
   *  assumption set's irradiance for an unknown orientation and the glazing proxy is not evaluated. */
  orientationDeg: number | null;
  /** Total glazed area, 0–floor area × 3 m². */
  glazingAreaM2: number;
  /** Openable window area (free area of the openable sashes), 0–floor area m² (0: no windows open). */
  openableAreaM2: number;
  windowType: WindowType;
  /** Total solar energy transmittance of the glazing, 0.05–0.9. Null: assumptions.comfort.defaultGlazingGValue. */
  glazingGValue: number | null;
  ventilationType: VentilationType;
  /** Existing mechanical outdoor-air supply (or extract for extract-only systems), 0–5,000 L/s.
   *  Null for a mechanical type: assumptions.mechanical.defaultSupplyLpsPerPerson × occupants. Ignored for natural types. */
  mechanicalSupplyLps: number | null;
}

/** The building the room is in. */
export interface BlockInput {
  /** 1800–2100. Null: the room is assessed as an existing building (refurbishment criteria) and the
   *  air permeability default for unknown age is used. */
  yearBuilt: number | null;
  /** Null: the air permeability default is chosen by year built only. */
  constructionType: ConstructionType | null;
  /** m³/(h·m²) at 50 Pa, 0.5–50. Null: assumptions.infiltration.defaultAirPermeability (by construction, then era). */
  airPermeabilityM3hM2: number | null;
  /** Null: the school's heating fuel. */
  heatingFuel: HeatingFuel | null;
  /** Informative only today (reported back); 1900–2100 or null. */
  heatingInstalledYear: number | null;
}

/** The school the block belongs to. */
export interface SchoolInput {
  phase: SchoolPhase;
  climateRegion: ClimateRegion;
  heatingFuel: HeatingFuel;
  /** £/kWh of delivered heating fuel, 0–2. Null: assumptions.finance.fuelPricesGbpPerKwh[fuel]. */
  fuelPriceGbpPerKwh: number | null;
  /** Seasonal efficiency of the heat generator (COP for heat pumps), 0.3–6. Null: assumptions.energy.heatGeneratorEfficiency[fuel]. */
  boilerEfficiency: number | null;
}

/** Everything the engine needs to know about one room. */
export interface RoomAssessmentInput {
  room: RoomInput;
  block: BlockInput;
  school: SchoolInput;
  /** The room's calibration from measured CO2 (engine/measured/calibrate.ts), if one is active. */
  calibration?: RoomCalibration | null;
}

/**
 * What a calibration from measured CO2 changes in a room's model: how far windows are really opened in each
 * season (a factor on the season profile's opening fractions, occupied and empty alike) and the infiltration.
 */
export interface RoomCalibration {
  /** Factor on the window opening of each calibrated season, ≥ 0 (a season not listed keeps 1). */
  windowUseFactor: Partial<Record<Season, number>>;
  /** Infiltration measured by after-school decays, L/s ≥ 0; null keeps the air-permeability estimate. */
  infiltrationLps: number | null;
  /** Words for results, e.g. 'calibrated from 42 days of readings (version 2)'. */
  label: string;
}

/** Options for one call of assessRoom. */
export interface AssessOptions {
  /** Sample the CO2 curve every 5 minutes (default true). Batch runs pass false for speed. */
  withCurve?: boolean;
}

// ---------------------------------------------------------------------------------------------
// Assumption set
// ---------------------------------------------------------------------------------------------

/** How sure we are of a value, as tagged in the domain reference. */
export type SourceStatus = 'confirmed' | 'secondary' | 'from_memory' | 'common_practice';

/** Who edits a value in the app: estates managers edit technical values, finance leads financial ones. */
export type AssumptionKind = 'technical' | 'financial';

/** One assumed value with its provenance. The engine reads only `value`. */
export interface Assumed<T> {
  value: T;
  /** Unit of the value, e.g. 'ppm', '£/kWh', '-' (dimensionless), 'table'. */
  unit: string;
  /** Words a person reads in the assumptions screen. */
  label: string;
  /** Where the value comes from (standard, paper, table) or why we chose it. */
  source: string;
  status: SourceStatus;
  kind: AssumptionKind;
  /** True where sources disagree or the value needs a decision: show it highlighted. */
  flagged?: boolean;
  note?: string;
}

/** The three representative seasons of the school year. */
export type Season = 'winter' | 'mid' | 'summer';

/** One period of the school day with constant occupancy and window state. Minutes are minutes after midnight. */
export interface TimetableSegment {
  label: string;
  kind: 'lesson' | 'break' | 'lunch' | 'empty';
  startMinute: number;
  endMinute: number;
  /** Share of design occupancy present, 0–1 (lessons 1, empty periods 0). */
  occupancyFraction: number;
}

/** Outdoor climate of one region, from which the three seasons are derived. */
export interface ClimateRegionData {
  name: string;
  /** Monthly mean (24-hour) outdoor air temperature, January first, °C. */
  monthlyMeanTempC: readonly number[];
  /** Seasonal mean wind speed at 10 m, m/s. */
  windSpeedMs: Record<Season, number>;
  source: string;
  status: SourceStatus;
}

/** How a season is lived in: which months, how warm the room is kept, how far windows are opened. */
export interface SeasonProfile {
  /** Months (1–12) of the school year in this season. */
  months: readonly number[];
  /** School days a year in this season. */
  schoolDays: number;
  /** Room air temperature while occupied, °C. */
  indoorTempC: number;
  /** Fraction of the openable area actually opened while pupils are in, 0–1. */
  windowOpenFractionOccupied: number;
  /** Fraction opened while the room is empty (breaks, lunch), 0–1. */
  windowOpenFractionEmpty: number;
}

/** A criteria pack: one published set of CO2 limits. */
export interface CriteriaPack {
  id: string;
  name: string;
  family: 'bb101_2018' | 'en16798_1';
  ventilation: 'natural' | 'mechanical' | 'any';
  build: 'new_build' | 'refurbishment' | 'any';
  /** 'absolute': limits are ppm; 'above_outdoor': limits are ppm above outdoor CO2. */
  basis: 'absolute' | 'above_outdoor';
  /** Limit on the occupied-period mean. */
  meanLimitPpm: number;
  /** Level not to be exceeded for more than `maxMinutesCap` consecutive minutes; null when the pack has none. */
  maxLimitPpm: number | null;
  maxMinutesCap: number | null;
  source: string;
  status: SourceStatus;
  flagged?: boolean;
  note?: string;
}

/** A generic ventilation unit model of the trust's catalogue. */
export interface UnitModel {
  id: string;
  name: string;
  /** Nominal balanced outdoor-air flow, L/s. */
  nominalFlowLps: number;
  /** Dry supply-side temperature ratio (EN 308 definition), 0–1. */
  heatRecoveryEfficiency: number;
  /** Specific fan power, W/(L/s), supply + extract. */
  specificFanPowerWPerLps: number;
  installedCostGbp: number;
  annualMaintenanceGbp: number;
  lifeYears: number;
  /** Sound pressure level at 1 m (or as the catalogue states), dB(A). */
  soundDbA: number;
}

/** The full set of assumptions an assessment runs under. Versioned; every result records the version. */
export interface AssumptionSet {
  version: string;
  /** ISO date the set was issued. */
  dated: string;
  air: {
    outdoorCo2Ppm: Assumed<number>;
    atmosphericPressureKpa: Assumed<number>;
  };
  occupancy: {
    /** Persily & de Jonge (2017) Table 4 rows, L/s at 273.15 K and 101.325 kPa. */
    generationTable: Assumed<GenerationRow[]>;
    /** Metabolic rate of pupils by room use and age group, met. */
    pupilMetByUse: Assumed<Record<RoomUse, number>>;
    /** Added to pupil met for younger/older groups (e.g. primary pupils sit stiller). */
    pupilMetAdjustByAge: Assumed<Record<AgeGroup, number>>;
    adultMet: Assumed<number>;
    timetable: Assumed<TimetableSegment[]>;
    /** Room uses the CO2 criteria and risk apply to (teaching rooms). */
    teachingUses: Assumed<RoomUse[]>;
  };
  seasons: Assumed<Record<Season, SeasonProfile>>;
  climate: {
    regions: Assumed<Record<ClimateRegion, ClimateRegionData>>;
    /** Occupied daytime hours are warmer than the 24-hour monthly mean by this much, K. */
    daytimeOffsetK: Assumed<number>;
  };
  windows: {
    method: Assumed<'warren_parkins' | 'de_gids_phaff'>;
    dischargeCoefficient: Assumed<number>;
    /** Height of an opening used in the stack term, m. */
    openingHeightM: Assumed<number>;
    /** Share of the nominal openable area that acts as free area, by window type, 0–1. */
    effectiveOpeningFactor: Assumed<Record<WindowType, number>>;
    /** Wind pressure-coefficient difference across the building for cross ventilation. */
    crossWindDeltaCp: Assumed<number>;
    /** Local reference wind speed at the opening divided by the 10 m met-station speed. */
    siteWindFactor: Assumed<number>;
    /** Multiplier on window opening in rooms that also have mechanical supply. */
    windowUseWithMechanical: Assumed<number>;
  };
  infiltration: {
    /** Kronvall–Persily divisor: n_inf = n50 / divisor. */
    kpDivisor: Assumed<number>;
    /** Exposed envelope area of a room per m² of floor. */
    envelopeAreaPerFloorArea: Assumed<number>;
    defaultAirPermeabilityByConstruction: Assumed<Record<ConstructionType, number>>;
    /** Default air permeability by era when construction is unknown: built before 1980, 1980–2005, 2006 on, unknown. */
    defaultAirPermeabilityByEra: Assumed<{
      before1980: number;
      from1980to2005: number;
      from2006: number;
      unknown: number;
    }>;
  };
  mechanical: {
    defaultSupplyLpsPerPerson: Assumed<number>;
    ventilationClass: Assumed<Record<VentilationType, 'natural' | 'mechanical'>>;
  };
  criteria: {
    packs: Assumed<CriteriaPack[]>;
    family: Assumed<'bb101_2018' | 'en16798_1'>;
    enCategory: Assumed<'I' | 'II' | 'III' | 'IV'>;
    buildStatus: Assumed<'by_year_built' | 'new_build' | 'refurbishment'>;
    newBuildFromYear: Assumed<number>;
    /** Thresholds always reported besides the criterion's own, ppm. */
    referenceThresholdsPpm: Assumed<number[]>;
  };
  risk: {
    /** Upper bounds of the first three bands in pupil-hours a year above the threshold. */
    bandUpperPupilHours: Assumed<[number, number, number]>;
    /** Pupil-hours a year at which the risk score reaches 0.5. */
    scoreHalfPupilHours: Assumed<number>;
  };
  energy: {
    heatingIndoorTempC: Assumed<number>;
    /** Outdoor temperature above which recovered heat is not useful, °C. */
    heatingCutoffTempC: Assumed<number>;
    /** ρ·c_p of air, W per (L/s·K). */
    airHeatCapacityWPerLpsK: Assumed<number>;
    /** Seasonal efficiency of the heat generator by fuel (COP for heat pumps). */
    heatGeneratorEfficiency: Assumed<Record<HeatingFuel, number>>;
  };
  comfort: {
    defaultGlazingGValue: Assumed<number>;
    glazingUValueWm2K: Assumed<number>;
    wallUValueWm2K: Assumed<number>;
    frameFactor: Assumed<number>;
    shadingFactor: Assumed<number>;
    /** 24-hour mean vertical solar irradiance in July by facing, W/m²: N, E, S, W and unknown. */
    julyIrradianceWm2: Assumed<{ N: number; E: number; S: number; W: number; unknown: number }>;
    sensibleGainPerPersonW: Assumed<number>;
    equipmentLightingGainW: Assumed<number>;
    winterClothingClo: Assumed<number>;
    winterRelativeHumidityPct: Assumed<number>;
    winterAirSpeedMs: Assumed<number>;
    draughtTurbulencePct: Assumed<number>;
    /** Distance of the first desks from the glazing, m. */
    deskDistanceFromWindowM: Assumed<number>;
    insideSurfaceResistanceM2KW: Assumed<number>;
    /** Window opening at night in summer, fraction of openable area. */
    summerNightOpenFraction: Assumed<number>;
    adaptiveCategoryOffsetK: Assumed<number>;
  };
  finance: {
    /** Price of the energy bought for each heating fuel (heat pumps and direct electric: electricity), £/kWh. */
    fuelPricesGbpPerKwh: Assumed<Record<HeatingFuel, number>>;
    electricityPriceGbpPerKwh: Assumed<number>;
    /** Carbon factor of the energy bought for each heating fuel, kgCO2e/kWh. */
    carbonFactorsKgCo2ePerKwh: Assumed<Record<HeatingFuel, number>>;
    electricityKgCo2ePerKwh: Assumed<number>;
    /** Real discount rate, 0–0.2. */
    discountRate: Assumed<number>;
    appraisalYears: Assumed<number>;
  };
  retrofit: {
    unitCatalogue: Assumed<UnitModel[]>;
    /** Combined sound level of the units in a teaching room, dB(A). */
    soundLimitDbA: Assumed<number>;
    maxUnitsPerRoom: Assumed<number>;
    /** Window opening in the heating season once units are installed, fraction. */
    windowOpenFractionWithUnits: Assumed<number>;
  };
}

/** One row of Persily & de Jonge (2017) Table 4, mixed or single sex. */
export interface GenerationRow {
  ageGroup: AgeGroup;
  sex: 'M' | 'F';
  /** Age band as printed. */
  ages: string;
  /** CO2 generation at 1.0, 1.2, 1.4, 1.6, 2.0, 3.0, 4.0 met, L/s at 273 K. */
  lpsByMet: readonly [number, number, number, number, number, number, number];
}

// ---------------------------------------------------------------------------------------------
// Output
// ---------------------------------------------------------------------------------------------

/** Outdoor-air flow into the room during lessons, by route, L/s. */
export interface VentilationBreakdown {
  windowLps: number;
  infiltrationLps: number;
  mechanicalLps: number;
  totalLps: number;
}

/** How long CO2 stays above one threshold over the school day. */
export interface ThresholdExceedance {
  thresholdPpm: number;
  /** Longest uninterrupted run above the threshold, minutes. */
  longestRunMinutes: number;
  /** All minutes above the threshold in the school day. */
  minutesOver: number;
  /** Minutes above the threshold while pupils are in, weighted by the share present. */
  occupiedMinutesOver: number;
}

/** One sample of the CO2 curve. */
export interface CurvePoint {
  /** Minutes after midnight. */
  minute: number;
  co2Ppm: number;
}

/** CO2 over one representative school day of one season. */
export interface SeasonAssessment {
  season: Season;
  outdoorTempC: number;
  indoorTempC: number;
  windSpeedMs: number;
  windowOpenFraction: number;
  ventilation: VentilationBreakdown;
  airChangesPerHour: number;
  /** CO2 generated at full occupancy, L/s at room temperature. */
  generationLps: number;
  /** CO2 the room would settle at with everyone in, ppm. */
  steadyStateCo2Ppm: number;
  occupiedMeanCo2Ppm: number;
  peakCo2Ppm: number;
  /** One entry per criterion threshold and reference threshold, ascending. */
  thresholds: ThresholdExceedance[];
  /** Longest run above the criterion's maximum (0 when the pack has no maximum). */
  longestRunAboveMaxMinutes: number;
  minutesOverMax: number;
  meanMet: boolean;
  maxMet: boolean;
  criterionMet: boolean;
  /** Sampled every 5 minutes over the school day; empty when assessed with { withCurve: false }. */
  curve: CurvePoint[];
}

/** The criterion the room was judged against. */
export interface AppliedCriterion {
  packId: string;
  packName: string;
  meanLimitPpm: number;
  maxLimitPpm: number | null;
  maxMinutesCap: number | null;
  /** Threshold used for risk (pupil-hours above), ppm: the mean limit. */
  riskThresholdPpm: number;
  flagged: boolean;
  note: string | null;
}

/** Four bands of our own naming, least to most concern. */
export type RiskBand = 'fresh' | 'stuffy' | 'stale' | 'very_stale';

/** How much poor air pupils breathe in this room, banded, with the reason in words. */
export interface RiskResult {
  pupilHoursPerYearAbove: number;
  thresholdPpm: number;
  band: RiskBand;
  bandLabel: string;
  /** 0 (no exposure) to 1 (approaches 1 as exposure grows). */
  score: number;
  reason: string;
}

/** Winter comfort, summer overheating and the glazing proxy of a room. */
export interface ComfortResult {
  winter: {
    airTempC: number;
    meanRadiantTempC: number;
    glazingSurfaceTempC: number;
    pmv: number;
    ppdPct: number;
    /** Cold downdraught off the glazing at the first desks (Heiselberg 1994), m/s. */
    downdraughtSpeedMs: number;
    /** ISO 7730 draught rate at the first desks, %. */
    draughtRatePct: number;
    /** Screening labels: 'ok' or the reason for concern. */
    concern: string | null;
  };
  summer: {
    solarGainW: number;
    internalGainW: number;
    heatTransferWPerK: number;
    /** 24-hour mean room temperature rise over outdoors (§9.3 screening index), K. */
    overheatingIndexK: number;
    predictedMeanTempC: number;
    adaptiveMaxTempC: number;
    overheatingLikely: boolean;
  };
  /** Approved Document O simplified-method proxy; a housing regulation, shown as a proxy only. */
  glazingProxy: {
    label: string;
    facing: 'N' | 'E' | 'S' | 'W' | null;
    glazingToFloorPct: number;
    limitPct: number | null;
    exceeds: boolean;
  };
}

/** Money, energy and carbon of a set of installed units (per room or per unit). */
export interface RetrofitMoney {
  capitalCostGbp: number;
  annualHeatRecoveredKwh: number;
  annualFuelSavedKwh: number;
  annualFanKwh: number;
  annualMaintenanceGbp: number;
  annualNetSavingGbp: number;
  annualNetSavingKgCo2e: number;
  simplePaybackYears: number | null;
  discountedPaybackYears: number | null;
  npvGbp: number;
}

/** One model of unit and how many of it. */
export interface RetrofitUnitLine {
  modelId: string;
  modelName: string;
  count: number;
}

/** The heat-recovery retrofit of a room: units, money for the room (fields of RetrofitMoney) and per unit, and the comparison with today. */
export interface RetrofitResult extends RetrofitMoney {
  targetPackId: string;
  requiredSupplyLps: number;
  installedSupplyLps: number;
  units: RetrofitUnitLine[];
  unitCount: number;
  /** False when no combination within maxUnitsPerRoom meets the flow: units empty and money zero. */
  feasible: boolean;
  combinedSoundDbA: number | null;
  soundLimitMet: boolean;
  /** Winter supply-air temperature after heat recovery (no fan heat), °C. */
  supplyTempC: number | null;
  /** Money, energy and carbon of one unit (the room's figures divided by the unit count). */
  perUnit: RetrofitMoney;
  pupilHoursRemovedPerYear: number;
  pupilHoursRemovedPer1000Gbp: number | null;
  /** Capital per tonne CO2e saved over the unit life; null when the units save no carbon. */
  capitalPerTonneCo2eGbp: number | null;
  vsToday: {
    todayHeatLossKwh: number;
    withUnitsHeatLossKwh: number;
    /** Positive: with units the room costs more a year to run than today. */
    annualExtraCostGbp: number;
    annualExtraKgCo2e: number;
  };
  comparisonWithToday: string;
  notes: string[];
}

/** The result of assessing one room: plain JSON. */
export interface RoomAssessment {
  roomCode: string;
  assumptionsVersion: string;
  isTeachingRoom: boolean;
  pupils: number;
  /** Pupils plus adults. */
  occupants: number;
  volumeM3: number;
  ventilationClass: 'natural' | 'mechanical';
  buildStatus: 'new_build' | 'refurbishment';
  airPermeabilityM3hM2: number;
  heatingFuel: HeatingFuel;
  criterion: AppliedCriterion;
  seasons: Record<Season, SeasonAssessment>;
  worstSeason: Season;
  criteriaMet: boolean;
  risk: RiskResult;
  comfort: ComfortResult;
  retrofit: RetrofitResult | null;
  /** Defaults used for null inputs, e.g. 'block.airPermeabilityM3hM2 → 12 m³/(h·m²) (system-built default)'. */
  defaultsUsed: string[];
  cautions: string[];
  /** What the risk rests on (measured readings, calibrated model, prediction), once measured evidence is applied. */
  evidence?: EvidenceSummary;
}

// ---------------------------------------------------------------------------------------------
// Ranking
// ---------------------------------------------------------------------------------------------

export interface RankWeights {
  risk: number;
  costEffectiveness: number;
  payback: number;
}

/** The few numbers ranking needs, taken from a RoomAssessment by toRankInput. */
export interface RankInput {
  roomId: string;
  roomCode: string;
  pupils: number;
  riskScore: number;
  riskBand: RiskBand;
  pupilHoursPerYearAbove: number;
  thresholdPpm: number;
  criteriaMet: boolean;
  hasRetrofit: boolean;
  pupilHoursRemovedPer1000Gbp: number | null;
  simplePaybackYears: number | null;
  capitalCostGbp: number | null;
}

/** A ranked room with its place, score and reason. */
export interface RankedRow extends RankInput {
  rank: number;
  /** Weighted score 0–1 and its three normalised parts. */
  score: number;
  parts: { risk: number; costEffectiveness: number; payback: number };
  rankReason: string;
}
