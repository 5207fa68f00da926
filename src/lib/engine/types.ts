/**
 * The public contract of the Airtally assessment engine: what goes in, what comes out.
 * Everything here is plain data (JSON-serialisable); the engine never does I/O.
 * Units live in the field names (Lps = litres per second, Ppm = parts per million by volume,
 * M2 = square metres, C = degrees Celsius, Kwh = kilowatt-hours, Gbp = pounds sterling).
 */
import type {
  AgeGroup,
  BaselineId,
  ClimateRegion,
  ConstructionType,
  FrameMaterial,
  HeatingFuel,
  RoomUse,
  SchoolPhase,
  SummerMode,
  VentilationType,
  WindowType,
} from './vocabulary';
import type { EvidenceSummary } from './measured/evidence';

/** The vocabulary types, re-exported for callers of the engine. */
export type {
  AgeGroup,
  BaselineId,
  ClimateRegion,
  ConstructionType,
  FrameMaterial,
  HeatingFuel,
  RoomUse,
  SchoolPhase,
  SummerMode,
  VentilationType,
  WindowType,
} from './vocabulary';

// ---------------------------------------------------------------------------------------------
// Input
// ---------------------------------------------------------------------------------------------

/**
 * One room as the register holds it. Ranges are declared once in limits.ts (ROOM_LIMITS). A null is an unknown
 * value: the engine then uses the default of `assumptions.defaults.room` and lists the field in the result's
 * `assumed`.
 */
export interface RoomInput {
  code: string;
  name: string;
  /** Null: assumed a classroom. */
  use: RoomUse | null;
  floorAreaM2: number;
  ceilingHeightM: number | null;
  /** Whole pupils at design occupancy. Null: floor area ÷ the default floor area per pupil (teaching rooms). */
  pupils: number | null;
  /** Whole adults at design occupancy. Null: the default for the room use. */
  adults: number | null;
  /** Null: from the school phase. */
  ageGroup: AgeGroup | null;
  /** Bearing of the main glazed façade, 0 = north, clockwise. Null: summer solar gain uses the irradiance for an
   *  unknown orientation and the glazing proxy is not evaluated. */
  orientationDeg: number | null;
  /** Total glazed area, at most 3 × floor area. Null: a default share of the floor area. */
  glazingAreaM2: number | null;
  /** Openable window area (free area of the openable sashes), at most the glazing area. Null: a default share. */
  openableAreaM2: number | null;
  windowType: WindowType | null;
  /** Window frame material (sets the frame factor). Null: the default frame factor. */
  frameMaterial: FrameMaterial | null;
  /** Total solar energy transmittance of the glazing. Null: the default g-value. */
  glazingGValue: number | null;
  /** Null: assumed natural, single-sided. */
  ventilationType: VentilationType | null;
  /** Existing mechanical outdoor-air supply (or extract for extract-only systems), L/s. Null for a mechanical type:
   *  the default supply per m² of floor. Ignored for natural types. */
  mechanicalSupplyLps: number | null;
  /** Share of the openable area open on average in winter while pupils are in, 0–1, as observed for this room.
   *  Null: the assumption set's winter window opening. */
  winterWindowOpenFraction: number | null;
}

/** The building the room is in. Heating fuel, price and efficiency take precedence over the school's. */
export interface BlockInput {
  /** Null: the room is assessed as an existing building (refurbishment criteria) and the
   *  air permeability default for unknown age is used. */
  yearBuilt: number | null;
  /** Null: the air permeability default is chosen by year built only. */
  constructionType: ConstructionType | null;
  /** m³/(h·m²) at 50 Pa. Null: assumptions.infiltration.defaultAirPermeability (by construction, then era). */
  airPermeabilityM3hM2: number | null;
  /** Null: the school's heating fuel. */
  heatingFuel: HeatingFuel | null;
  /** £/kWh of the block's delivered heating energy. Null: the school's price (when the fuel is the school's), else
   *  the assumption set's price for the fuel. */
  fuelPriceGbpPerKwh: number | null;
  /** Seasonal efficiency of the block's heating plant (seasonal COP for heat pumps, 1 for direct electric).
   *  Null: the school's (when the fuel is the school's), else the assumption set's for the fuel. */
  heatingEfficiency: number | null;
  /** Informative only today (reported back); 1900–2100 or null. */
  heatingInstalledYear: number | null;
}

/** The school the block belongs to. */
export interface SchoolInput {
  phase: SchoolPhase;
  climateRegion: ClimateRegion;
  heatingFuel: HeatingFuel;
  /** £/kWh of delivered heating fuel. Null: assumptions.finance.fuelPricesGbpPerKwh[fuel]. */
  fuelPriceGbpPerKwh: number | null;
  /** Seasonal efficiency of the heating plant (seasonal COP for heat pumps, 1 for direct electric).
   *  Null: assumptions.energy.heatGeneratorEfficiency[fuel]. */
  heatingEfficiency: number | null;
  /** The school's own day. Null: the assumption set's timetable. Pass the same array for every room of a school. */
  timetable: readonly TimetableSegment[] | null;
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

/** How sure we are of a value (docs/sources.md explains each tag). */
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
    /** Mean daily range of outdoor temperature by month (January first), K (hours.ts). */
    dailyRangeK: Assumed<number[]>;
    /** Day-to-day standard deviation of daily mean temperature by month (January first), K (hours.ts). */
    dayToDaySdK: Assumed<number[]>;
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
    /** Local reference wind speed at the opening divided by the 10 m met-station speed (BS 5925 U_r/U_m). */
    siteWindFactor: Assumed<number>;
    /** Frame factor (glazed share of a window's area) by frame material, and for an unknown frame. */
    frameFactorByMaterial: Assumed<Record<FrameMaterial | 'unknown', number>>;
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
    /** Mechanical supply when the register does not say, per m² of floor (not per occupant, so that more pupils
     *  never buy more air), L/(s·m²). */
    defaultSupplyLpsPerM2: Assumed<number>;
    ventilationClass: Assumed<Record<VentilationType, 'natural' | 'mechanical'>>;
    /** How each existing system moves air: balanced or not, its specific fan power and heat recovery. */
    existingSystems: Assumed<Record<VentilationType, ExistingSystem>>;
    /** Servicing of an existing fan system that units replace, as a share of the units' own servicing. */
    existingMaintenanceShareOfUnits: Assumed<number>;
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
    /** How far above the mean limit (share of it, 0–1) a daily mean counts as far over. */
    farOverShare: Assumed<number>;
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
    glazingUValueWm2K: Assumed<number>;
    wallUValueWm2K: Assumed<number>;
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
    /** The baseline the headline figures (columns, totals, ranking by payback) are against; chosen by the finance lead. */
    headlineBaseline: Assumed<BaselineId>;
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
    /** Share of today's window opening kept once units run, by season (0: windows stay shut). */
    windowKeptWithUnits: Assumed<Record<Season, number>>;
    /** How units run: outside the heating season bypassed or off; extra run hours a school day (purge). */
    operation: Assumed<{ summerMode: SummerMode; extraRunHoursPerDay: number }>;
    /** The cheapest option that meets the criterion without heat recovery (a supply fan with extract grilles). */
    simplerOption: Assumed<SimplerOption>;
  };
  /** Values assumed for unknown register fields (the result lists each one it used). */
  defaults: {
    room: Assumed<RoomDefaults>;
  };
}

/** How an existing ventilation system moves air. */
export interface ExistingSystem {
  /** 'balanced': supply and extract; 'unbalanced': one fan (combines with infiltration in quadrature); 'none'. */
  balance: 'none' | 'balanced' | 'unbalanced';
  /** Specific fan power of the existing fans, W/(L/s). */
  specificFanPowerWPerLps: number;
  /** Dry heat-recovery temperature ratio of the existing system, 0–1. */
  heatRecoveryEfficiency: number;
}

/** A generic option that meets the criterion without heat recovery, for baseline (c). */
export interface SimplerOption {
  name: string;
  /** Installed cost per room, £. */
  capitalBaseGbp: number;
  /** Installed cost per L/s supplied, £. */
  capitalGbpPerLps: number;
  specificFanPowerWPerLps: number;
  annualMaintenanceGbp: number;
  lifeYears: number;
}

/** Values used for unknown register fields. */
export interface RoomDefaults {
  use: RoomUse;
  ceilingHeightM: number;
  /** Floor area per pupil in a teaching room at design occupancy, m². */
  floorAreaPerPupilM2: number;
  /** Adults in a teaching room (others: none). */
  adultsInTeachingRoom: number;
  glazingShareOfFloor: number;
  openableShareOfGlazing: number;
  windowType: WindowType;
  glazingGValue: number;
  ventilationType: VentilationType;
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
  /** Outdoor air of all routes together: balanced fans + windows + √(unbalanced fan² + infiltration²)
   *  (ASHRAE Handbook—Fundamentals (2017) ch. 16 superposition), L/s. */
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

/** Four bands on the criterion measures (how far and how long above the criterion), least to most concern. */
export type RiskBand = 'meets' | 'peaks_over' | 'over' | 'far_over';

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
    /** ISO 7730 PMV; null when the screening case is outside the standard's range (see `outOfRange`). */
    pmv: number | null;
    ppdPct: number | null;
    /** Cold downdraught off the glazing at the first desks (Heiselberg 1994), m/s. */
    downdraughtSpeedMs: number;
    /** ISO 7730 draught rate at the first desks, %; null outside the model's range (20–26 °C, below 0.5 m/s). */
    draughtRatePct: number | null;
    /** Which indicator could not be evaluated and why (nothing is extrapolated). */
    outOfRange: string[];
    /** Screening labels: 'ok' or the reason for concern. */
    concern: string | null;
  };
  summer: {
    solarGainW: number;
    internalGainW: number;
    heatTransferWPerK: number;
    /** 24-hour mean room temperature rise over outdoors (steady daily-mean screening index), K. */
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

/** One model of unit and how many of it. */
export interface RetrofitUnitLine {
  modelId: string;
  modelName: string;
  count: number;
}

/** Annual money, energy and carbon lines against one baseline. Positive = saved against it, negative = extra. */
export interface AnnualLines {
  /** Delivered heating energy saved (fuel, or electricity for electric and heat-pump heating), kWh. */
  heatingKwh: number;
  heatingGbp: number;
  heatingKgCo2e: number;
  /** Fan electricity saved (negative: the units use more), kWh. */
  fanKwh: number;
  fanGbp: number;
  fanKgCo2e: number;
  /** Servicing saved (negative: the units cost more to service), £. */
  maintenanceGbp: number;
}

/** How a retrofit fares against one baseline. */
export interface BaselineAppraisal {
  /** Which baseline; label() gives its words and baselineDescription (appraisal.ts) what it is for this room. */
  baseline: BaselineId;
  /** Capital spent beyond the baseline's, £ (the units' cost less the simpler option's for baseline (c)). */
  capitalCostGbp: number;
  annual: AnnualLines;
  /** Net saving a year: heating + fans + maintenance, £ (replacement excluded). */
  annualNetSavingGbp: number;
  /** Net delivered energy saved a year (heating + fan electricity), kWh. */
  annualNetSavingKwh: number;
  annualNetSavingKgCo2e: number;
  /** Units replaced at the end of their life within the appraisal period: years and cost each time (real £). */
  replacements: { year: number; costGbp: number }[];
  /** Capital over net annual saving, years; null when the saving is not positive ("never"). */
  simplePaybackYears: number | null;
  /** Year in which the discounted cash flows (replacements included) repay the capital; null: not within 1,000 years. */
  discountedPaybackYears: number | null;
  /** NPV over the appraisal period, replacements included, £. */
  npvGbp: number;
  /** Pupil-hours a year of air above the criterion's threshold removed against this baseline. */
  pupilHoursRemovedPerYear: number;
  /** Net running cost a year per pupil-hour of poor air removed, £; null unless the units cost money to run and remove some. */
  runningCostPerPupilHourGbp: number | null;
  /** 'pays_back': NPV ≥ 0; 'saves_slowly': saves money a year but not the capital within the period; 'costs_to_run'.
   *  baselineWords (appraisal.ts) puts it in a sentence. */
  verdict: 'pays_back' | 'saves_slowly' | 'costs_to_run';
}

/** The hours behind every energy figure of a result. */
export interface HoursUsed {
  /** School-day hours of the timetable used (the school's own, or the assumption set's). */
  schoolDayHours: number;
  timetableSource: 'school' | 'assumption set';
  /** School hours in a year (school days × day length), h. */
  schoolHoursPerYear: number;
  /** Of those, hours colder than the heating cut-off, h. */
  heatingHoursPerYear: number;
  /** Occupied heating degree-hours, K·h. */
  heatingDegreeHoursKh: number;
  /** Hours a year the units' fans run, h. */
  unitRunHoursPerYear: number;
  summerMode: SummerMode;
  /** How the hours were found, in words. */
  method: string;
}

/** The heating fuel, price and efficiency a room's energy is priced with, and where each came from. */
export interface HeatingUsed {
  fuel: HeatingFuel;
  fuelSource: 'block' | 'school';
  priceGbpPerKwh: number;
  priceSource: 'block' | 'school' | 'trust';
  /** Seasonal efficiency (seasonal COP for heat pumps). */
  efficiency: number;
  efficiencySource: 'block' | 'school' | 'trust';
  carbonKgCo2ePerKwh: number;
}

/**
 * The heat-recovery retrofit of a room appraised against named baselines (the fields the capital programme and
 * the finance views read; documented in DEVELOPERS.md).
 */
export interface RoomAppraisal {
  targetPackId: string;
  /** Outdoor air the units must supply to meet the mechanical criterion in winter, L/s. */
  requiredSupplyLps: number;
  installedSupplyLps: number;
  /** Existing non-recovering fan supply the units take over, L/s (0 for natural rooms); baseline (b) then moves
   *  the same air with the existing fans, otherwise through windows. */
  replacesExistingLps: number;
  /** Installed cost of the simpler compliant option of baseline (c) for the same flow, £. */
  simplerOptionCapitalGbp: number;
  units: RetrofitUnitLine[];
  unitCount: number;
  /** "2 × Wall unit 150 + 1 × Sill unit 60". */
  unitModels: string;
  /** False when no combination within maxUnitsPerRoom meets the flow: units empty and money zero. */
  feasible: boolean;
  /** True when the units are recommended: the room fails its criterion today. A room that meets it gets no units
   *  recommended, though its appraisal is kept (the swap of old fans for heat recovery can still pay back). */
  recommended: boolean;
  combinedSoundDbA: number | null;
  soundLimitMet: boolean;
  /** Winter supply-air temperature after heat recovery (no fan heat), °C. */
  supplyTempC: number | null;
  /** Installed cost of the units, £. */
  capitalCostGbp: number;
  lifeYears: number;
  /** Pupil-hours a year above the threshold removed against today. */
  pupilHoursRemovedPerYear: number;
  pupilHoursRemovedPer1000Gbp: number | null;
  /** The baseline the headline figures use (assumptions.finance.headlineBaseline, or today's when (c) does not apply). */
  headline: BaselineId;
  baselines: {
    today: BaselineAppraisal;
    same_air_without_recovery: BaselineAppraisal;
    /** Null when no simpler compliant option is cheaper, or today's operation already complies. */
    simpler_option: BaselineAppraisal | null;
  };
  /** Capital per tonne CO2e saved over the unit life against the headline baseline; null when it saves none. */
  capitalPerTonneCo2eGbp: number | null;
  /** Outdoor air while pupils are in, in winter, today and with the units, L/s (comparisonWords puts them in words). */
  winterOutdoorAirTodayLps: number;
  winterOutdoorAirWithUnitsLps: number;
  notes: string[];
}

/** What the model assumed about a room's windows (shown so a person can correct it for that room). */
export interface WindowAssumptions {
  /** Openable area × effective-opening factor of the window type, m². */
  effectiveAreaM2: number;
  effectiveOpeningFactor: number;
  method: 'warren_parkins' | 'de_gids_phaff' | 'cross';
  /** Share of the openable area open while pupils are in, by season. */
  openFractionOccupied: Record<Season, number>;
  /** Share open during breaks and lunch, by season. */
  openFractionEmpty: Record<Season, number>;
  /** 'room': the register's winter observation for this room; 'assumption set': the season default. */
  winterSource: 'room' | 'assumption set';
  /** Kept while fans run (mechanical rooms open windows less), 0–1. */
  useWithMechanical: number;
}

/** An unknown register value and what the engine used instead. */
export interface AssumedValue {
  /** Input path, e.g. 'room.pupils'. */
  field: string;
  value: string | number;
  /** Why that value, in words. */
  reason: string;
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
  heating: HeatingUsed;
  hours: HoursUsed;
  windows: WindowAssumptions;
  criterion: AppliedCriterion;
  seasons: Record<Season, SeasonAssessment>;
  worstSeason: Season;
  criteriaMet: boolean;
  risk: RiskResult;
  comfort: ComfortResult;
  /** The heat-recovery retrofit against each baseline; null for rooms outside the criteria (not teaching, no pupils). */
  appraisal: RoomAppraisal | null;
  /** Unknown inputs and the values used for them (assumedWords in assess.ts puts them in sentences). */
  assumed: AssumedValue[];
  /** Assumptions missing from an older stored set and taken from Airtally's defaults (paths). */
  assumptionsFilled: string[];
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
