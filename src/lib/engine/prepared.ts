/**
 * What an assumption set (and each school timetable and climate region under it) implies once, shared by every
 * room assessed under it. Caches only: every value here is computed by the tested modules.
 */
import { completeAssumptionSet, validateAssumptionSet } from './assumption-tools';
import { DEFAULT_ASSUMPTIONS } from './assumptions';
import type { DaySegment } from './co2-mass-balance';
import { applyPack, choosePack } from './criteria';
import { EngineInputError } from './errors';
import { schoolDayHours, schoolYearHours, type SeasonHours } from './hours';
import { generationPerPersonLps } from './occupancy';
import { choicePerformance, chooseUnits, describeUnitLines, type UnitChoice, unitLines } from './retrofit';
import type {
  AgeGroup,
  AppliedCriterion,
  AssumptionSet,
  ClimateRegion,
  HoursUsed,
  SeasonProfile,
  RetrofitUnitLine,
  Season,
  TimetableSegment,
} from './types';

/** A timetable's derived figures. */
export interface PreparedDay {
  timetable: readonly TimetableSegment[];
  dayHours: number;
  /** Occupancy-weighted hours of the day (lesson time at full occupancy), h. */
  occupiedHours: number;
  /** Share of the day's minutes with pupils in (windows at their lesson opening), 0–1. */
  occupiedShare: number;
  /** Reused mass-balance segments (the engine is synchronous). */
  segments: DaySegment[];
  /** School-year hours per climate region. */
  hours: Map<ClimateRegion, Record<Season, SeasonHours>>;
  /** The hours a result reports, per climate region (shared by every room of the school). */
  hoursUsed: Map<ClimateRegion, HoursUsed>;
  /** Per climate region: the season figures rooms read, as lists in SEASON_ORDER. */
  seasonTables: Map<ClimateRegion, SeasonTable>;
}

/**
 * What every room of a school day and region reads per season, as lists in SEASON_ORDER (winter, mid, summer) so
 * the engine's season loops index lists instead of looking up records by a changing key.
 */
export interface SeasonTable {
  profiles: readonly SeasonProfile[];
  hours: readonly SeasonHours[];
  /** Meteorological wind at 10 m, m/s. */
  windSpeed10Ms: readonly number[];
  /** Heating degree-hours per season, K·h (a record, as the appraisal reads them). */
  degreeHoursKh: Record<Season, number>;
}

/** The order of every season list. */
export const SEASON_ORDER: readonly Season[] = ['winter', 'mid', 'summer'];

/** A room's criterion, the mechanical target units are sized to, and the thresholds a result reports. */
export interface PreparedCriteria {
  criterion: AppliedCriterion;
  target: AppliedCriterion;
  /** Sorted distinct thresholds of both packs and the set's reference thresholds, ppm. */
  thresholds: number[];
  /** Index in `thresholds` of the criterion's risk threshold. */
  riskIndex: number;
  /** The threshold a run above is reported against (the pack's maximum, else its mean limit), ppm, and its index. */
  runThresholdPpm: number;
  runIndex: number;
}

/** The set's derived figures. */
export interface Prepared {
  /** The set with any assumption missing from an older stored version filled from the defaults. */
  set: AssumptionSet;
  /** Paths filled that way, reported with each result. */
  filled: string[];
  /** The set's own timetable. */
  defaultDay: PreparedDay;
  days: WeakMap<readonly TimetableSegment[], PreparedDay>;
  generation: Map<AgeGroup, Map<number, number>>;
  unitChoices: Map<number, ReportedChoice | null>;
  thresholds: Map<string, Map<string, number[]>>;
  /** The set's window opening by season, shared by every room without its own observation. */
  windowShares: { occupied: Record<Season, number>; empty: Record<Season, number> };
  /** windowShares as lists in SEASON_ORDER. */
  windowShareLists: { occupied: readonly number[]; empty: readonly number[] };
  /** Criteria by ventilation class and build status. */
  criteria: Map<string, PreparedCriteria>;
  /** Mean of the summer months' 24-hour mean outdoor temperatures per climate region, °C. */
  summerMeanTempC: Map<ClimateRegion, number>;
}

const preparedCache = new WeakMap<AssumptionSet, Prepared>();

/** Checks a school's timetable as the set's own is checked: ordered, back to back, within the day. */
export function validateTimetable(field: string, timetable: readonly TimetableSegment[]): void {
  if (!Array.isArray(timetable) || timetable.length === 0)
    throw new EngineInputError(field, 'needs at least one period');
  timetable.forEach((seg, i) => {
    if (!(seg.startMinute >= 0 && seg.endMinute <= 1440 && seg.endMinute > seg.startMinute))
      throw new EngineInputError(`${field}.${i}`, 'must start and end within the day, end after start');
    if (!(seg.occupancyFraction >= 0 && seg.occupancyFraction <= 1))
      throw new EngineInputError(`${field}.${i}.occupancyFraction`, 'must be between 0 and 1');
    const prev = timetable[i - 1];
    if (prev && prev.endMinute !== seg.startMinute)
      throw new EngineInputError(
        `${field}.${i}.startMinute`,
        `must start when the previous period ends (${prev.endMinute})`,
      );
  });
}

function prepareDay(timetable: readonly TimetableSegment[]): PreparedDay {
  let occupiedMinutes = 0;
  let minutesWithPupils = 0;
  for (const s of timetable) {
    occupiedMinutes += (s.endMinute - s.startMinute) * s.occupancyFraction;
    if (s.occupancyFraction > 0) minutesWithPupils += s.endMinute - s.startMinute;
  }
  const dayHours = schoolDayHours(timetable);
  return {
    timetable,
    dayHours,
    occupiedHours: occupiedMinutes / 60,
    occupiedShare: dayHours > 0 ? minutesWithPupils / (60 * dayHours) : 0,
    segments: [],
    hours: new Map(),
    hoursUsed: new Map(),
    seasonTables: new Map(),
  };
}

function seasonRecord(
  set: AssumptionSet,
  key: 'windowOpenFractionOccupied' | 'windowOpenFractionEmpty',
): Record<Season, number> {
  const s = set.seasons.value;
  return { winter: s.winter[key], mid: s.mid[key], summer: s.summer[key] };
}

/** The prepared set (cached per set object). */
export function prepare(given: AssumptionSet): Prepared {
  const cached = preparedCache.get(given);
  if (cached) return cached;
  const { set, filled } = completeAssumptionSet(given, DEFAULT_ASSUMPTIONS);
  validateAssumptionSet(set);
  const prepared: Prepared = {
    set,
    filled,
    defaultDay: prepareDay(set.occupancy.timetable.value),
    days: new WeakMap(),
    generation: new Map(),
    unitChoices: new Map(),
    thresholds: new Map(),
    windowShares: {
      occupied: seasonRecord(set, 'windowOpenFractionOccupied'),
      empty: seasonRecord(set, 'windowOpenFractionEmpty'),
    },
    windowShareLists: { occupied: [], empty: [] },
    criteria: new Map(),
    summerMeanTempC: new Map(),
  };
  prepared.windowShareLists = {
    occupied: SEASON_ORDER.map((s) => prepared.windowShares.occupied[s]),
    empty: SEASON_ORDER.map((s) => prepared.windowShares.empty[s]),
  };
  preparedCache.set(given, prepared);
  return prepared;
}

/** The day of a school (its own timetable when it has one, checked once per timetable object). */
export function dayOf(p: Prepared, timetable: readonly TimetableSegment[] | null): PreparedDay {
  if (timetable === null) return p.defaultDay;
  let day = p.days.get(timetable);
  if (!day) {
    validateTimetable('school.timetable', timetable);
    day = prepareDay(timetable);
    p.days.set(timetable, day);
  }
  return day;
}

/** School-year hours of a day in a region (hours.ts), cached. */
export function hoursOf(p: Prepared, day: PreparedDay, region: ClimateRegion): Record<Season, SeasonHours> {
  let hours = day.hours.get(region);
  if (!hours) {
    const set = p.set;
    hours = schoolYearHours({
      region: set.climate.regions.value[region],
      dailyRangeK: set.climate.dailyRangeK.value,
      dayToDaySdK: set.climate.dayToDaySdK.value,
      seasons: set.seasons.value,
      timetable: day.timetable,
      indoorTempC: set.energy.heatingIndoorTempC.value,
      cutoffTempC: set.energy.heatingCutoffTempC.value,
    });
    day.hours.set(region, hours);
  }
  return hours;
}

/** The season figures of a day in a region (hours.ts, the set's profiles, the region's wind), cached. */
export function seasonTableOf(p: Prepared, day: PreparedDay, region: ClimateRegion): SeasonTable {
  let table = day.seasonTables.get(region);
  if (!table) {
    const hours = hoursOf(p, day, region);
    const wind = p.set.climate.regions.value[region].windSpeedMs;
    table = {
      profiles: SEASON_ORDER.map((s) => p.set.seasons.value[s]),
      hours: SEASON_ORDER.map((s) => hours[s]),
      windSpeed10Ms: SEASON_ORDER.map((s) => wind[s]),
      degreeHoursKh: {
        winter: hours.winter.degreeHoursKh,
        mid: hours.mid.degreeHoursKh,
        summer: hours.summer.degreeHoursKh,
      },
    };
    day.seasonTables.set(region, table);
  }
  return table;
}

/** Mean of the summer months' 24-hour mean outdoor temperatures of a region, °C (stands in for the TM52 running mean), cached. */
export function summerMeanTempCOf(p: Prepared, region: ClimateRegion): number {
  let mean = p.summerMeanTempC.get(region);
  if (mean === undefined) {
    const months = p.set.seasons.value.summer.months;
    const monthly = p.set.climate.regions.value[region].monthlyMeanTempC;
    mean = 0;
    for (const m of months) mean += monthly[m - 1] as number;
    mean /= months.length;
    p.summerMeanTempC.set(region, mean);
  }
  return mean;
}

/**
 * The criterion of a room of this ventilation class and build status (criteria.ts), the mechanical pack units are
 * sized to, and the thresholds results report, cached.
 */
export function criteriaFor(
  p: Prepared,
  ventilationClass: 'natural' | 'mechanical',
  buildStatus: 'new_build' | 'refurbishment',
): PreparedCriteria {
  const key =
    ventilationClass === 'natural'
      ? buildStatus === 'new_build'
        ? 'nn'
        : 'nr'
      : buildStatus === 'new_build'
        ? 'mn'
        : 'mr';
  let found = p.criteria.get(key);
  if (!found) {
    const outdoorCo2 = p.set.air.outdoorCo2Ppm.value;
    const criterion = applyPack(choosePack(p.set, ventilationClass, buildStatus), outdoorCo2);
    const target = applyPack(choosePack(p.set, 'mechanical', buildStatus), outdoorCo2);
    const thresholds = thresholdsFor(p, criterion, target);
    const runThresholdPpm = criterion.maxLimitPpm ?? criterion.meanLimitPpm;
    found = {
      criterion,
      target,
      thresholds,
      riskIndex: thresholds.indexOf(criterion.riskThresholdPpm),
      runThresholdPpm,
      runIndex: thresholds.indexOf(runThresholdPpm),
    };
    p.criteria.set(key, found);
  }
  return found;
}

/**
 * The hours behind every energy figure of a school's rooms: school, heating and unit run hours and the heating
 * degree-hours, cached per timetable and region. Unit run hours: school days × (school day + extra purge hours),
 * without the summer season when units are off.
 */
export function hoursUsedOf(p: Prepared, day: PreparedDay, region: ClimateRegion, ownTimetable: boolean): HoursUsed {
  let used = day.hoursUsed.get(region);
  if (!used) {
    const set = p.set;
    const hours = hoursOf(p, day, region);
    const op = set.retrofit.operation.value;
    let unitRunHours = 0;
    for (const season of ['winter', 'mid', 'summer'] as const) {
      if (op.summerMode === 'off' && season === 'summer') continue;
      unitRunHours += set.seasons.value[season].schoolDays * (day.dayHours + op.extraRunHoursPerDay);
    }
    used = {
      schoolDayHours: day.dayHours,
      timetableSource: ownTimetable ? 'school' : 'assumption set',
      schoolHoursPerYear: hours.winter.schoolHours + hours.mid.schoolHours + hours.summer.schoolHours,
      heatingHoursPerYear: hours.winter.heatingHours + hours.mid.heatingHours + hours.summer.heatingHours,
      heatingDegreeHoursKh: hours.winter.degreeHoursKh + hours.mid.degreeHoursKh + hours.summer.degreeHoursKh,
      unitRunHoursPerYear: unitRunHours,
      summerMode: op.summerMode,
      method: `Hourly outdoor temperatures from the region's monthly means with a daily cycle and day-to-day spread, over the ${ownTimetable ? "school's own" : "assumption set's"} timetable; heating below ${set.energy.heatingCutoffTempC.value} °C outdoors`,
    };
    day.hoursUsed.set(region, used);
  }
  return used;
}

/** Mixed-sex CO2 generation per person at `met` (Persily & de Jonge 2017 Table 4), cached. */
export function perPersonGenerationLps(p: Prepared, ageGroup: AgeGroup, met: number): number {
  let byMet = p.generation.get(ageGroup);
  if (!byMet) {
    byMet = new Map();
    p.generation.set(ageGroup, byMet);
  }
  let value = byMet.get(met);
  if (value === undefined) {
    value = generationPerPersonLps(p.set.occupancy.generationTable.value, ageGroup, met);
    byMet.set(met, value);
  }
  return value;
}

/** A unit choice with its lines as a result reports them. */
export type ReportedChoice = UnitChoice & {
  reported: RetrofitUnitLine[];
  models: string;
  performance: ReturnType<typeof choicePerformance>;
};

/** The cheapest catalogue units for a whole-l/s supply, cached (the catalogue and limits are fixed per set);
 *  `lines` and `models` are the choice as a result reports it. */
export function unitsFor(p: Prepared, requiredSupplyLps: number): ReportedChoice | null {
  let choice = p.unitChoices.get(requiredSupplyLps);
  if (choice === undefined) {
    const chosen = chooseUnits({
      requiredSupplyLps,
      catalogue: p.set.retrofit.unitCatalogue.value,
      soundLimitDbA: p.set.retrofit.soundLimitDbA.value,
      maxUnits: p.set.retrofit.maxUnitsPerRoom.value,
    });
    if (chosen === null) choice = null;
    else {
      const lines = unitLines(chosen);
      choice = { ...chosen, reported: lines, models: describeUnitLines(lines), performance: choicePerformance(chosen) };
    }
    p.unitChoices.set(requiredSupplyLps, choice);
  }
  return choice ?? null;
}

/** Sorted distinct thresholds reported for a criterion and its retrofit target, cached per pair of packs. */
export function thresholdsFor(p: Prepared, criterion: AppliedCriterion, target: AppliedCriterion): number[] {
  let byTarget = p.thresholds.get(criterion.packId);
  if (!byTarget) {
    byTarget = new Map();
    p.thresholds.set(criterion.packId, byTarget);
  }
  let list = byTarget.get(target.packId);
  if (!list) {
    const all = [criterion.meanLimitPpm, target.meanLimitPpm, ...p.set.criteria.referenceThresholdsPpm.value];
    if (criterion.maxLimitPpm !== null) all.push(criterion.maxLimitPpm);
    if (target.maxLimitPpm !== null) all.push(target.maxLimitPpm);
    list = [...new Set(all)].sort((x, y) => x - y);
    byTarget.set(target.packId, list);
  }
  return list;
}
