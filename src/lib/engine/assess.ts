/**
 * Assess one room under an assumption set: the engine's one entry point. It composes the small modules:
 * occupancy → ventilation (windows, infiltration, mechanical) → CO2 per season → criteria → risk →
 * comfort → retrofit. Pure: no I/O, no clock, no randomness.
 */
import { completeAssumptionSet, validateAssumptionSet } from './assumption-tools';
import { DEFAULT_ASSUMPTIONS } from './assumptions';
import { occupiedHeatingDegreeHours, schoolDayHours, seasonOutdoorTempC } from './climate-regions';
import { simulateDay, type DaySegment } from './co2-mass-balance';
import {
  adaptiveMaxTempC,
  coldDowndraughtSpeedMs,
  draughtRatePct,
  glazingProxy,
  overheatingIndex,
  pmvPpd,
} from './comfort';
import { applyPack, buildStatusOf, choosePack } from './criteria';
import { supplyTempAfterRecoveryC } from './energy';
import { formatGbp, formatInt } from './format';
import { infiltrationLps } from './infiltration';
import { generationAtRoomLps, generationPerPersonLps } from './occupancy';
import {
  capitalPerTonneCo2eGbp,
  choicePerformance,
  chooseUnits,
  perUnitMoney,
  pupilHoursPer1000Gbp,
  requiredOutdoorAirLps,
  retrofitMoney,
  unitLines,
  type UnitChoice,
} from './retrofit';
import { assessRisk, pupilHoursPerYear } from './risk';
import type {
  AppliedCriterion,
  AssessOptions,
  AssumptionSet,
  ClimateRegion,
  ComfortResult,
  CurvePoint,
  HeatingFuel,
  RetrofitMoney,
  RetrofitResult,
  RoomAssessment,
  RoomAssessmentInput,
  Season,
  SeasonAssessment,
  TimetableSegment,
} from './types';
import { calibrationOf, describeCalibration } from './measured/calibration-hook';
import { validateRoomInput } from './validate-input';
import { windowAirflowLps } from './window-airflow';

/** Cautions every result carries. */
export const ENGINE_CAUTIONS: readonly string[] = [
  'Screening estimates for prioritising, not a design.',
  'Ventilation design and installation defer to local building regulations, school guidance and a competent, licensed engineer.',
];

const SEASONS: readonly Season[] = ['winter', 'mid', 'summer'];

/** What an assumption set implies once, shared by every room assessed under it. */
interface Prepared {
  /** The set with any assumption missing from an older stored version filled from the defaults. */
  set: AssumptionSet;
  /** Paths filled that way, reported with each result. */
  filled: string[];
  timetable: readonly TimetableSegment[];
  dayHours: number;
  /** Occupancy-weighted hours of the day (lesson time at full occupancy), h. */
  occupiedHours: number;
  totalSchoolDays: number;
  regions: Map<ClimateRegion, RegionDerived>;
  generation: Map<string, Map<number, number>>;
  /** Unit choices by required supply (whole l/s): the catalogue and limits are fixed for the set. */
  unitChoices: Map<number, UnitChoice | null>;
  /** Sorted thresholds reported for a pair of criterion and retrofit-target packs. */
  thresholds: Map<string, Map<string, number[]>>;
  /** Reused segment objects for the mass balance (the engine is synchronous). */
  segments: DaySegment[];
}

interface RegionDerived {
  outdoorTempC: Record<Season, number>;
  localWindMs: Record<Season, number>;
  degreeHoursKh: Record<Season, number>;
  degreeHoursTotalKh: number;
}

const preparedCache = new WeakMap<AssumptionSet, Prepared>();

function prepare(given: AssumptionSet): Prepared {
  const cached = preparedCache.get(given);
  if (cached) return cached;
  const { set, filled } = completeAssumptionSet(given, DEFAULT_ASSUMPTIONS);
  validateAssumptionSet(set);
  const timetable = set.occupancy.timetable.value;
  let occupiedMinutes = 0;
  for (const s of timetable) occupiedMinutes += (s.endMinute - s.startMinute) * s.occupancyFraction;
  const seasons = set.seasons.value;
  const prepared: Prepared = {
    set,
    filled: filled.map((path) => `assumptions.${path} → Airtally default (not in this stored set)`),
    timetable,
    dayHours: schoolDayHours(timetable),
    occupiedHours: occupiedMinutes / 60,
    totalSchoolDays: seasons.winter.schoolDays + seasons.mid.schoolDays + seasons.summer.schoolDays,
    regions: new Map(),
    generation: new Map(),
    unitChoices: new Map(),
    thresholds: new Map(),
    segments: timetable.map((t) => ({
      startMinute: t.startMinute,
      endMinute: t.endMinute,
      generationLps: 0,
      flowLps: 0,
      occupancyFraction: t.occupancyFraction,
    })),
  };
  preparedCache.set(given, prepared);
  return prepared;
}

function regionDerived(set: AssumptionSet, p: Prepared, code: ClimateRegion): RegionDerived {
  const hit = p.regions.get(code);
  if (hit) return hit;
  const region = set.climate.regions.value[code];
  const seasons = set.seasons.value;
  const offset = set.climate.daytimeOffsetK.value;
  const siteWind = set.windows.siteWindFactor.value;
  const degreeHoursKh = occupiedHeatingDegreeHours({
    region,
    seasons,
    dayHours: p.dayHours,
    indoorTempC: set.energy.heatingIndoorTempC.value,
    cutoffTempC: set.energy.heatingCutoffTempC.value,
    daytimeOffsetK: offset,
  });
  const derived: RegionDerived = {
    outdoorTempC: {
      winter: seasonOutdoorTempC(region, seasons.winter, offset),
      mid: seasonOutdoorTempC(region, seasons.mid, offset),
      summer: seasonOutdoorTempC(region, seasons.summer, offset),
    },
    localWindMs: {
      winter: region.windSpeedMs.winter * siteWind,
      mid: region.windSpeedMs.mid * siteWind,
      summer: region.windSpeedMs.summer * siteWind,
    },
    degreeHoursKh,
    degreeHoursTotalKh: degreeHoursKh.winter + degreeHoursKh.mid + degreeHoursKh.summer,
  };
  p.regions.set(code, derived);
  return derived;
}

function perPersonGeneration(
  set: AssumptionSet,
  p: Prepared,
  ageGroup: RoomAssessmentInput['room']['ageGroup'],
  met: number,
): number {
  let byMet = p.generation.get(ageGroup);
  if (!byMet) {
    byMet = new Map();
    p.generation.set(ageGroup, byMet);
  }
  const hit = byMet.get(met);
  if (hit !== undefined) return hit;
  const value = generationPerPersonLps(set.occupancy.generationTable.value, ageGroup, met);
  byMet.set(met, value);
  return value;
}

/** Flows of one season for the current operation (or with units), L/s. */
interface SeasonFlows {
  windowOccupiedLps: number;
  windowEmptyLps: number;
  infiltrationLps: number;
  mechanicalLps: number;
}

/** Fill the set's reusable segments for one day (valid until the next call). */
function daySegments(p: Prepared, generationLps: number, flows: SeasonFlows): DaySegment[] {
  const out = p.segments;
  const base = flows.infiltrationLps + flows.mechanicalLps;
  for (let i = 0; i < out.length; i++) {
    const seg = out[i] as DaySegment;
    seg.generationLps = generationLps * seg.occupancyFraction;
    seg.flowLps = base + (seg.occupancyFraction > 0 ? flows.windowOccupiedLps : flows.windowEmptyLps);
  }
  return out;
}

/** Time-weighted mean outdoor-air flow over the school day, L/s. */
function meanDayFlowLps(timetable: readonly TimetableSegment[], flows: SeasonFlows): number {
  let sum = 0;
  let minutes = 0;
  for (const s of timetable) {
    const d = s.endMinute - s.startMinute;
    sum +=
      d *
      (flows.infiltrationLps +
        flows.mechanicalLps +
        (s.occupancyFraction > 0 ? flows.windowOccupiedLps : flows.windowEmptyLps));
    minutes += d;
  }
  return minutes > 0 ? sum / minutes : 0;
}

function sortedUnique(values: number[]): number[] {
  values.sort((x, y) => x - y);
  const out: number[] = [];
  for (const v of values) if (out.length === 0 || out[out.length - 1] !== v) out.push(v);
  return out;
}

/** Assess one room: CO2 per season, criteria, risk, comfort and the heat-recovery retrofit. */
export function assessRoom(
  input: RoomAssessmentInput,
  assumptions: AssumptionSet,
  options: AssessOptions = {},
): RoomAssessment {
  validateRoomInput(input);
  const p = prepare(assumptions);
  const set = p.set;
  const { room, block, school } = input;
  const withCurve = options.withCurve !== false;
  const defaultsUsed: string[] = p.filled.length > 0 ? [...p.filled] : [];

  // --- Room geometry and occupancy -------------------------------------------------------------
  const volumeM3 = room.floorAreaM2 * room.ceilingHeightM;
  const occupants = room.pupils + room.adults;
  const isTeachingRoom = set.occupancy.teachingUses.value.includes(room.use);
  const ventilationClass = set.mechanical.ventilationClass.value[room.ventilationType];
  const buildStatus = buildStatusOf(set, block.yearBuilt);
  const fuel: HeatingFuel = block.heatingFuel ?? school.heatingFuel;
  const outdoorCo2 = set.air.outdoorCo2Ppm.value;
  const pressureKpa = set.air.atmosphericPressureKpa.value;

  const pupilMet = clamp(
    set.occupancy.pupilMetByUse.value[room.use] + set.occupancy.pupilMetAdjustByAge.value[room.ageGroup],
    1,
    4,
  );
  const adultMet = clamp(set.occupancy.adultMet.value, 1, 4);
  const tableLps =
    (room.pupils > 0 ? room.pupils * perPersonGeneration(set, p, room.ageGroup, pupilMet) : 0) +
    (room.adults > 0 ? room.adults * perPersonGeneration(set, p, 'adult', adultMet) : 0);

  // --- Ventilation routes ----------------------------------------------------------------------
  let airPermeability = block.airPermeabilityM3hM2;
  if (airPermeability === null) {
    const byEra = set.infiltration.defaultAirPermeabilityByEra.value;
    if (block.constructionType !== null) {
      airPermeability = set.infiltration.defaultAirPermeabilityByConstruction.value[block.constructionType];
      defaultsUsed.push(
        `block.airPermeabilityM3hM2 → ${airPermeability} m³/(h·m²) (default for ${block.constructionType.replace('_', ' ')})`,
      );
    } else {
      const y = block.yearBuilt;
      airPermeability =
        y === null ? byEra.unknown : y < 1980 ? byEra.before1980 : y < 2006 ? byEra.from1980to2005 : byEra.from2006;
      defaultsUsed.push(`block.airPermeabilityM3hM2 → ${airPermeability} m³/(h·m²) (default by year built)`);
    }
  }
  const calibration = calibrationOf(input);
  if (calibration) defaultsUsed.push(describeCalibration(calibration));
  const infLps =
    calibration?.infiltrationLps ??
    infiltrationLps({
      airPermeabilityM3hM2: airPermeability,
      envelopeAreaM2: room.floorAreaM2 * set.infiltration.envelopeAreaPerFloorArea.value,
      volumeM3,
      divisor: set.infiltration.kpDivisor.value,
    });

  const hasFan = room.ventilationType !== 'natural_single_sided' && room.ventilationType !== 'natural_cross';
  let mechLps = 0;
  if (hasFan) {
    if (room.mechanicalSupplyLps === null) {
      mechLps = set.mechanical.defaultSupplyLpsPerPerson.value * occupants;
      defaultsUsed.push(`room.mechanicalSupplyLps → ${formatInt(mechLps)} l/s (default per person)`);
    } else mechLps = room.mechanicalSupplyLps;
  }
  const effectiveAreaM2 = room.openableAreaM2 * set.windows.effectiveOpeningFactor.value[room.windowType];
  const windowUse = hasFan ? set.windows.windowUseWithMechanical.value : 1;
  const cross = room.ventilationType === 'natural_cross';
  if (room.glazingGValue === null)
    defaultsUsed.push(`room.glazingGValue → ${set.comfort.defaultGlazingGValue.value} (default)`);
  if (block.heatingFuel === null) defaultsUsed.push(`block.heatingFuel → ${fuel} (the school's fuel)`);

  const region = regionDerived(set, p, school.climateRegion);
  const profiles = set.seasons.value;

  // --- Criteria --------------------------------------------------------------------------------
  const criterion = applyPack(choosePack(set, ventilationClass, buildStatus), outdoorCo2);
  const target = applyPack(choosePack(set, 'mechanical', buildStatus), outdoorCo2);
  let byTarget = p.thresholds.get(criterion.packId);
  if (!byTarget) {
    byTarget = new Map();
    p.thresholds.set(criterion.packId, byTarget);
  }
  let thresholds = byTarget.get(target.packId);
  if (!thresholds) {
    const list: number[] = [criterion.meanLimitPpm, target.meanLimitPpm, ...set.criteria.referenceThresholdsPpm.value];
    if (criterion.maxLimitPpm !== null) list.push(criterion.maxLimitPpm);
    if (target.maxLimitPpm !== null) list.push(target.maxLimitPpm);
    thresholds = sortedUnique(list);
    byTarget.set(target.packId, thresholds);
  }

  // --- CO2 per season --------------------------------------------------------------------------
  const seasonFlows: Record<Season, SeasonFlows> = {} as Record<Season, SeasonFlows>;
  const seasonGen: Record<Season, number> = { winter: 0, mid: 0, summer: 0 };
  const seasons = {} as Record<Season, SeasonAssessment>;
  let criteriaMet = true;
  let meetsTarget = true;
  let worstSeason: Season = 'winter';
  for (const season of SEASONS) {
    const profile = profiles[season];
    const outdoorTempC = region.outdoorTempC[season];
    const windSpeedMs = region.localWindMs[season];
    const capacityLps = windowAirflowLps({
      method: set.windows.method.value,
      cross,
      effectiveAreaM2,
      windSpeedMs,
      openingHeightM: set.windows.openingHeightM.value,
      indoorTempC: profile.indoorTempC,
      outdoorTempC,
      dischargeCoefficient: set.windows.dischargeCoefficient.value,
      deltaCp: set.windows.crossWindDeltaCp.value,
    });
    const seasonWindowUse = windowUse * (calibration?.windowUseFactor[season] ?? 1);
    const flows: SeasonFlows = {
      windowOccupiedLps: capacityLps * profile.windowOpenFractionOccupied * seasonWindowUse,
      windowEmptyLps: capacityLps * profile.windowOpenFractionEmpty * seasonWindowUse,
      infiltrationLps: infLps,
      mechanicalLps: mechLps,
    };
    seasonFlows[season] = flows;
    const generationLps = generationAtRoomLps({ tableLps, roomTempC: profile.indoorTempC, pressureKpa });
    seasonGen[season] = generationLps;
    const curve: CurvePoint[] | null = withCurve ? [] : null;
    const day = simulateDay({
      segments: daySegments(p, generationLps, flows),
      volumeM3,
      outdoorCo2Ppm: outdoorCo2,
      startPpm: outdoorCo2,
      thresholdsPpm: thresholds,
      curve,
    });
    const totalLps = flows.windowOccupiedLps + infLps + mechLps;
    const maxEntry = criterion.maxLimitPpm === null ? null : day.thresholds[thresholds.indexOf(criterion.maxLimitPpm)];
    const meanMet = day.meanPpm <= criterion.meanLimitPpm;
    const maxMet =
      maxEntry === null || maxEntry === undefined || maxEntry.longestRunMinutes <= (criterion.maxMinutesCap ?? 0);
    const targetMaxEntry = target.maxLimitPpm === null ? null : day.thresholds[thresholds.indexOf(target.maxLimitPpm)];
    if (
      !(day.meanPpm <= target.meanLimitPpm) ||
      (targetMaxEntry && targetMaxEntry.longestRunMinutes > (target.maxMinutesCap ?? 0))
    )
      meetsTarget = false;
    const criterionMet = meanMet && maxMet;
    if (!criterionMet) criteriaMet = false;
    seasons[season] = {
      season,
      outdoorTempC,
      indoorTempC: profile.indoorTempC,
      windSpeedMs,
      windowOpenFraction: profile.windowOpenFractionOccupied * seasonWindowUse,
      ventilation: { windowLps: flows.windowOccupiedLps, infiltrationLps: infLps, mechanicalLps: mechLps, totalLps },
      airChangesPerHour: (3.6 * totalLps) / volumeM3,
      generationLps,
      steadyStateCo2Ppm: totalLps > 0 ? outdoorCo2 + (1e6 * generationLps) / totalLps : Number.MAX_VALUE,
      occupiedMeanCo2Ppm: day.meanPpm,
      peakCo2Ppm: day.peakPpm,
      thresholds: day.thresholds,
      longestRunAboveMaxMinutes: maxEntry ? maxEntry.longestRunMinutes : 0,
      minutesOverMax: maxEntry ? maxEntry.minutesOver : 0,
      meanMet,
      maxMet,
      criterionMet,
      curve: curve ?? [],
    };
    if (day.meanPpm > seasons[worstSeason].occupiedMeanCo2Ppm) worstSeason = season;
  }

  // --- Risk ------------------------------------------------------------------------------------
  const riskIdx = thresholds.indexOf(criterion.riskThresholdPpm);
  const todayPupilHours = pupilHoursPerYear({
    pupils: room.pupils,
    perSeason: SEASONS.map((s) => ({
      occupiedMinutesOver: seasons[s].thresholds[riskIdx]?.occupiedMinutesOver ?? 0,
      schoolDays: profiles[s].schoolDays,
    })),
  });
  const worst = seasons[worstSeason];
  const runThreshold = criterion.maxLimitPpm ?? criterion.meanLimitPpm;
  const runEntry = worst.thresholds[thresholds.indexOf(runThreshold)];
  const risk = assessRisk({
    pupils: room.pupils,
    openableAreaM2: room.openableAreaM2,
    mechanicalLps: mechLps,
    pupilHours: todayPupilHours,
    thresholdPpm: criterion.riskThresholdPpm,
    bandUpper: set.risk.bandUpperPupilHours.value,
    halfPupilHours: set.risk.scoreHalfPupilHours.value,
    worstSeason,
    worstMeanPpm: worst.occupiedMeanCo2Ppm,
    runThresholdPpm: runThreshold,
    worstRunMinutes: runEntry ? runEntry.longestRunMinutes : 0,
  });

  // --- Comfort ---------------------------------------------------------------------------------
  const comfort = assessComfort(set, p, input, region, seasonFlows, pupilMet, cross);

  // --- Retrofit --------------------------------------------------------------------------------
  const retrofit =
    isTeachingRoom && !meetsTarget && room.pupils > 0
      ? assessRetrofit({
          set,
          p,
          input,
          region,
          fuel,
          target,
          criterion,
          thresholds,
          riskIdx,
          seasonFlows,
          seasonGen,
          volumeM3,
          todayPupilHours,
          defaultsUsed,
        })
      : null;

  return {
    roomCode: room.code,
    assumptionsVersion: set.version,
    isTeachingRoom,
    pupils: room.pupils,
    occupants,
    volumeM3,
    ventilationClass,
    buildStatus,
    airPermeabilityM3hM2: airPermeability,
    heatingFuel: fuel,
    criterion,
    seasons,
    worstSeason,
    criteriaMet,
    risk,
    comfort,
    retrofit,
    defaultsUsed,
    cautions: [...ENGINE_CAUTIONS],
  };
}

function clamp(x: number, lo: number, hi: number): number {
  return x < lo ? lo : Math.min(x, hi);
}

/** Winter PMV/PPD and draught for a screening case, summer overheating index, and the AD O proxy. */
function assessComfort(
  set: AssumptionSet,
  p: Prepared,
  input: RoomAssessmentInput,
  region: RegionDerived,
  flows: Record<Season, SeasonFlows>,
  pupilMet: number,
  cross: boolean,
): ComfortResult {
  const { room } = input;
  const c = set.comfort;
  const seasons = set.seasons.value;

  // Winter: mean radiant temperature lowered by cold glazing. Our screening rule: surfaces other than glazing
  // at air temperature; glazing inner surface θ_si = θ_i − U·R_si·(θ_i − θ_e) (BS EN ISO 6946 surface resistance);
  // t_r = area-weighted mean over floor, ceiling and four walls of a square room.
  const ti = seasons.winter.indoorTempC;
  const te = region.outdoorTempC.winter;
  const glazingSurfaceTempC = ti - c.glazingUValueWm2K.value * c.insideSurfaceResistanceM2KW.value * (ti - te);
  const side = Math.sqrt(room.floorAreaM2);
  const surfaceM2 = 2 * room.floorAreaM2 + 4 * side * room.ceilingHeightM;
  const glazedShare = Math.min(room.glazingAreaM2 / surfaceM2, 1);
  const meanRadiantTempC = ti - glazedShare * (ti - glazingSurfaceTempC);
  const airTempC = clamp(ti, 10, 30);
  const { pmv, ppdPct } = pmvPpd({
    airTempC,
    radiantTempC: clamp(meanRadiantTempC, 10, 40),
    airSpeedMs: c.winterAirSpeedMs.value,
    relativeHumidityPct: c.winterRelativeHumidityPct.value,
    met: clamp(pupilMet, 0.8, 4),
    clo: c.winterClothingClo.value,
  });
  // Draught at the first desks: the larger of the general occupied-zone air speed and the cold downdraught
  // off the glazing (height: glazed area over the façade width of a square room, at most the ceiling height).
  const glazingHeightM = Math.min(room.glazingAreaM2 / side, room.ceilingHeightM);
  const downdraughtSpeedMs = coldDowndraughtSpeedMs({
    surfaceDeltaTK: ti - glazingSurfaceTempC,
    surfaceHeightM: glazingHeightM,
    distanceM: c.deskDistanceFromWindowM.value,
  });
  const localSpeed = clamp(Math.max(c.winterAirSpeedMs.value, downdraughtSpeedMs), 0, 0.5);
  const draught = draughtRatePct({
    localAirTempC: clamp(ti, 20, 26),
    localAirSpeedMs: localSpeed,
    turbulencePct: c.draughtTurbulencePct.value,
  });
  const concern =
    pmv < -0.5
      ? 'Feels cool in winter: cold glazing lowers the radiant temperature'
      : draught > 20
        ? 'Draught risk near the windows in winter'
        : null;

  // Summer: §9.3 screening index.
  const facing = glazingProxy({
    glazingAreaM2: room.glazingAreaM2,
    floorAreaM2: room.floorAreaM2,
    orientationDeg: room.orientationDeg,
    crossVentilated: cross,
  });
  const irr = c.julyIrradianceWm2.value;
  const irradiance = facing.facing === null ? irr.unknown : irr[facing.facing];
  const facadeM2 = side * room.ceilingHeightM;
  const opaqueM2 = Math.max(0, facadeM2 - room.glazingAreaM2);
  const fabric = c.glazingUValueWm2K.value * room.glazingAreaM2 + c.wallUValueWm2K.value * opaqueM2;
  const summerFlows = flows.summer;
  const dayFlow = meanDayFlowLps(p.timetable, summerFlows);
  const nightLps =
    summerFlows.infiltrationLps +
    (summerFlows.windowOccupiedLps / Math.max(seasons.summer.windowOpenFractionOccupied, 1e-9)) *
      c.summerNightOpenFraction.value;
  const nightHours = Math.max(0, 24 - p.dayHours);
  const q24 = (dayFlow * p.dayHours + nightLps * nightHours) / 24;
  const occupants = room.pupils + room.adults;
  const index = overheatingIndex({
    glazingAreaM2: room.glazingAreaM2,
    gValue: room.glazingGValue ?? c.defaultGlazingGValue.value,
    frameFactor: c.frameFactor.value,
    shadingFactor: c.shadingFactor.value,
    irradianceWm2: irradiance,
    occupiedGainW: occupants * c.sensibleGainPerPersonW.value + c.equipmentLightingGainW.value,
    occupiedHours: p.occupiedHours,
    fabricHeatTransferWPerK: fabric,
    meanVentilationLps: q24,
  });
  // Screening: the season's 24-hour mean outdoor temperature stands in for the running mean (TM52 T_rm).
  const summerMeanC = region.outdoorTempC.summer - set.climate.daytimeOffsetK.value;
  const adaptiveMax = adaptiveMaxTempC(summerMeanC, c.adaptiveCategoryOffsetK.value);
  const predicted = summerMeanC + index.deltaTK;
  return {
    winter: {
      airTempC,
      meanRadiantTempC,
      glazingSurfaceTempC,
      pmv,
      ppdPct,
      downdraughtSpeedMs,
      draughtRatePct: draught,
      concern,
    },
    summer: {
      solarGainW: index.solarGainW,
      internalGainW: index.internalGainW,
      heatTransferWPerK: index.heatTransferWPerK,
      overheatingIndexK: index.deltaTK,
      predictedMeanTempC: predicted,
      adaptiveMaxTempC: adaptiveMax,
      overheatingLikely: predicted > adaptiveMax,
    },
    glazingProxy: facing,
  };
}

function assessRetrofit(args: {
  set: AssumptionSet;
  p: Prepared;
  input: RoomAssessmentInput;
  region: RegionDerived;
  fuel: HeatingFuel;
  target: AppliedCriterion;
  criterion: AppliedCriterion;
  thresholds: number[];
  riskIdx: number;
  seasonFlows: Record<Season, SeasonFlows>;
  seasonGen: Record<Season, number>;
  volumeM3: number;
  todayPupilHours: number;
  defaultsUsed: string[];
}): RetrofitResult {
  const { set, p, input, region, fuel, target, seasonFlows, seasonGen } = args;
  const { room, school } = input;
  const notes: string[] = [];
  const fin = set.finance;
  const outdoorCo2 = set.air.outdoorCo2Ppm.value;

  // Winter is the design case: windows shut once units run, so units plus infiltration must carry the load.
  const winter = seasonFlows.winter;
  const needTotal = requiredOutdoorAirLps({
    generationLps: seasonGen.winter,
    outdoorCo2Ppm: outdoorCo2,
    meanLimitPpm: target.meanLimitPpm,
    maxLimitPpm: target.maxLimitPpm,
  });
  const requiredSupplyLps =
    needTotal === null
      ? Number.POSITIVE_INFINITY
      : Math.max(0, Math.ceil(needTotal - winter.infiltrationLps - winter.mechanicalLps));
  let choice: UnitChoice | null = null;
  if (Number.isFinite(requiredSupplyLps) && requiredSupplyLps > 0) {
    const cached = p.unitChoices.get(requiredSupplyLps);
    if (cached !== undefined) choice = cached;
    else {
      choice = chooseUnits({
        requiredSupplyLps,
        catalogue: set.retrofit.unitCatalogue.value,
        soundLimitDbA: set.retrofit.soundLimitDbA.value,
        maxUnits: set.retrofit.maxUnitsPerRoom.value,
      });
      p.unitChoices.set(requiredSupplyLps, choice);
    }
  }

  const efficiency = school.boilerEfficiency ?? set.energy.heatGeneratorEfficiency.value[fuel];
  const fuelPrice = school.fuelPriceGbpPerKwh ?? fin.fuelPricesGbpPerKwh.value[fuel];
  if (school.boilerEfficiency === null && !args.defaultsUsed.some((d) => d.startsWith('school.boilerEfficiency'))) {
    args.defaultsUsed.push(`school.boilerEfficiency → ${efficiency} (default for ${fuel})`);
  }
  if (school.fuelPriceGbpPerKwh === null)
    args.defaultsUsed.push(`school.fuelPriceGbpPerKwh → £${fuelPrice}/kWh (default for ${fuel})`);
  const rhoCp = set.energy.airHeatCapacityWPerLpsK.value;
  const rate = fin.discountRate.value;
  const years = fin.appraisalYears.value;
  const fuelFactor = fin.carbonFactorsKgCo2ePerKwh.value[fuel];
  const elecPrice = fin.electricityPriceGbpPerKwh.value;
  const elecFactor = fin.electricityKgCo2ePerKwh.value;

  if (choice === null) {
    notes.push(
      requiredSupplyLps === 0
        ? 'Existing mechanical supply and infiltration already reach the required flow in steady state; check controls and operation instead of adding units.'
        : `No combination of up to ${set.retrofit.maxUnitsPerRoom.value} catalogue units supplies ${Number.isFinite(requiredSupplyLps) ? formatInt(requiredSupplyLps) : 'the required'} l/s: this room needs a bespoke design.`,
    );
    const zero: RetrofitMoney = {
      capitalCostGbp: 0,
      annualHeatRecoveredKwh: 0,
      annualFuelSavedKwh: 0,
      annualFanKwh: 0,
      annualMaintenanceGbp: 0,
      annualNetSavingGbp: 0,
      annualNetSavingKgCo2e: 0,
      simplePaybackYears: null,
      discountedPaybackYears: null,
      npvGbp: 0,
    };
    return {
      ...zero,
      targetPackId: target.packId,
      requiredSupplyLps: Number.isFinite(requiredSupplyLps) ? requiredSupplyLps : 0,
      installedSupplyLps: 0,
      units: [],
      unitCount: 0,
      feasible: false,
      combinedSoundDbA: null,
      soundLimitMet: true,
      supplyTempC: null,
      perUnit: zero,
      pupilHoursRemovedPerYear: 0,
      pupilHoursRemovedPer1000Gbp: null,
      capitalPerTonneCo2eGbp: null,
      vsToday: { todayHeatLossKwh: 0, withUnitsHeatLossKwh: 0, annualExtraCostGbp: 0, annualExtraKgCo2e: 0 },
      comparisonWithToday: 'No units recommended, so running costs are unchanged.',
      notes,
    };
  }
  if (!choice.soundLimitMet)
    notes.push(
      `The units together reach about ${formatInt(choice.soundDbA)} dB(A), above the ${set.retrofit.soundLimitDbA.value} dB(A) limit: an acoustic review is needed.`,
    );

  const perf = choicePerformance(choice);
  const fanRunHours = p.dayHours * p.totalSchoolDays;
  const money = retrofitMoney({
    capitalCostGbp: choice.capitalCostGbp,
    flowLps: choice.flowLps,
    heatRecoveryEfficiency: perf.heatRecoveryEfficiency,
    specificFanPowerWPerLps: perf.specificFanPowerWPerLps,
    annualMaintenanceGbp: perf.maintenanceGbp,
    degreeHoursKh: region.degreeHoursTotalKh,
    fanRunHours,
    airHeatCapacityWPerLpsK: rhoCp,
    heatGeneratorEfficiency: efficiency,
    fuelPriceGbpPerKwh: fuelPrice,
    electricityPriceGbpPerKwh: elecPrice,
    fuelKgCo2ePerKwh: fuelFactor,
    electricityKgCo2ePerKwh: elecFactor,
    discountRate: rate,
    appraisalYears: years,
  });
  if (years > perf.lifeYears)
    notes.push(
      `The appraisal period (${years} years) is longer than the unit life (${perf.lifeYears} years); replacement is not costed.`,
    );

  // With units: re-run the day per season with the units' flow; windows as today except in winter.
  const withUnitsFlows = {} as Record<Season, SeasonFlows>;
  let afterPupilHours = 0;
  const profiles = set.seasons.value;
  for (const season of SEASONS) {
    const today = seasonFlows[season];
    const winterShare =
      season === 'winter'
        ? set.retrofit.windowOpenFractionWithUnits.value / Math.max(profiles.winter.windowOpenFractionOccupied, 1e-9)
        : 1;
    const flows: SeasonFlows = {
      windowOccupiedLps: today.windowOccupiedLps * Math.min(winterShare, 1),
      windowEmptyLps: today.windowEmptyLps * Math.min(winterShare, 1),
      infiltrationLps: today.infiltrationLps,
      mechanicalLps: today.mechanicalLps + choice.flowLps,
    };
    withUnitsFlows[season] = flows;
    // Exact shortcut: the day starts at outdoor CO2 and each segment moves monotonically towards its steady state,
    // so if even the fully occupied steady state (lowest flow: occupied or empty windows) stays at or below the
    // threshold, CO2 never exceeds it.
    const lowestFlow =
      flows.infiltrationLps + flows.mechanicalLps + Math.min(flows.windowOccupiedLps, flows.windowEmptyLps);
    const threshold = args.criterion.riskThresholdPpm;
    if (outdoorCo2 + (1e6 * seasonGen[season]) / lowestFlow <= threshold) continue;
    const day = simulateDay({
      segments: daySegments(p, seasonGen[season], flows),
      volumeM3: args.volumeM3,
      outdoorCo2Ppm: outdoorCo2,
      startPpm: outdoorCo2,
      thresholdsPpm: [threshold],
    });
    afterPupilHours += (room.pupils * (day.thresholds[0]?.occupiedMinutesOver ?? 0) * profiles[season].schoolDays) / 60;
  }
  const removed = Math.max(0, args.todayPupilHours - afterPupilHours);

  // Today versus with units: heat lost with the outdoor air in each heating season, fans and maintenance.
  let todayHeat = 0;
  let withHeat = 0;
  for (const season of SEASONS) {
    const dh = region.degreeHoursKh[season];
    if (dh <= 0) continue;
    const t = meanDayFlowLps(p.timetable, seasonFlows[season]);
    const w = withUnitsFlows[season];
    const wNatural = meanDayFlowLps(p.timetable, w) - choice.flowLps;
    todayHeat += (rhoCp * t * dh) / 1000;
    withHeat += (rhoCp * (wNatural + choice.flowLps * (1 - perf.heatRecoveryEfficiency)) * dh) / 1000;
  }
  const todayCost = (todayHeat / efficiency) * fuelPrice;
  const withCost = (withHeat / efficiency) * fuelPrice + money.annualFanKwh * elecPrice + perf.maintenanceGbp;
  const extraCost = withCost - todayCost;
  const extraKg = ((withHeat - todayHeat) / efficiency) * fuelFactor + money.annualFanKwh * elecFactor;
  const winterToday =
    seasonFlows.winter.windowOccupiedLps + seasonFlows.winter.infiltrationLps + seasonFlows.winter.mechanicalLps;
  const comparisonWithToday =
    extraCost > 0
      ? `Better air costs energy: in winter about ${formatInt(winterToday)} l/s of outdoor air reaches the room today, the units would bring ${formatInt(choice.flowLps)} l/s, so heating, fans and servicing would cost about ${formatGbp(extraCost)} a year more than today (${formatInt(extraKg)} kgCO2e), even though heat recovery saves ${formatGbp(money.annualFuelSavedKwh * fuelPrice)} a year against bringing the same air through windows.`
      : `The units would also cost about ${formatGbp(-extraCost)} a year less to run than today (${formatInt(-extraKg)} kgCO2e less): heat recovery more than covers the fans, servicing and the extra fresh air.`;

  const supplyTempC = supplyTempAfterRecoveryC({
    outdoorTempC: region.outdoorTempC.winter,
    extractTempC: set.energy.heatingIndoorTempC.value,
    heatRecoveryEfficiency: perf.heatRecoveryEfficiency,
  });
  if (supplyTempC < 16)
    notes.push(
      `Winter supply air about ${formatInt(supplyTempC)} °C after heat recovery: check throw and draught at head height.`,
    );

  // Every field written out (no spread): V8 builds this object on its fast path.
  return {
    capitalCostGbp: money.capitalCostGbp,
    annualHeatRecoveredKwh: money.annualHeatRecoveredKwh,
    annualFuelSavedKwh: money.annualFuelSavedKwh,
    annualFanKwh: money.annualFanKwh,
    annualMaintenanceGbp: money.annualMaintenanceGbp,
    annualNetSavingGbp: money.annualNetSavingGbp,
    annualNetSavingKgCo2e: money.annualNetSavingKgCo2e,
    simplePaybackYears: money.simplePaybackYears,
    discountedPaybackYears: money.discountedPaybackYears,
    npvGbp: money.npvGbp,
    targetPackId: target.packId,
    requiredSupplyLps,
    installedSupplyLps: choice.flowLps,
    units: unitLines(choice),
    unitCount: choice.count,
    feasible: true,
    combinedSoundDbA: choice.soundDbA,
    soundLimitMet: choice.soundLimitMet,
    supplyTempC,
    perUnit: perUnitMoney(money, choice.count, rate, years),
    pupilHoursRemovedPerYear: removed,
    pupilHoursRemovedPer1000Gbp: pupilHoursPer1000Gbp(removed, choice.capitalCostGbp),
    capitalPerTonneCo2eGbp: capitalPerTonneCo2eGbp(choice.capitalCostGbp, money.annualNetSavingKgCo2e, perf.lifeYears),
    vsToday: {
      todayHeatLossKwh: todayHeat,
      withUnitsHeatLossKwh: withHeat,
      annualExtraCostGbp: extraCost,
      annualExtraKgCo2e: extraKg,
    },
    comparisonWithToday,
    notes,
  };
}
