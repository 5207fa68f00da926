/**
 * The allowed range of every number in an assumption set, declared once, with the unit people type it in. The
 * engine's check of a set (validateAssumptionSet), the API's 400 messages and the assumptions form all read this
 * table. Paths are dotted; `*` stands for any key of a table or index of a list (e.g. 'seasons.*.schoolDays').
 */
import { AGE_GROUPS, BASELINES, label, ROOM_USES, SUMMER_MODES, VENTILATION_TYPES, WINDOW_TYPES } from './vocabulary';

/** How a stored value is shown and typed: as stored, a share as %, £/kWh as p/kWh, minutes as hh:mm, months by name. */
export type DisplayUnit = 'as_stored' | 'percent' | 'pence' | 'clock' | 'months';

/** One number's allowed range, in the stored (SI) unit. */
export interface AssumptionLimit {
  min: number;
  max: number;
  integer?: boolean;
  /** How people read and type it (default: as stored, in the assumption's own unit). */
  display?: DisplayUnit;
  /** The stored unit of one cell, where the assumption as a whole is a table (its own unit says only 'table'). */
  unit?: string;
}

const share = (max = 1): AssumptionLimit => ({ min: 0, max, display: 'percent' });

/** Every number's range by path pattern. A test checks that each number of the default set has one. */
export const ASSUMPTION_LIMITS: Record<string, AssumptionLimit> = {
  'air.outdoorCo2Ppm': { min: 250, max: 1000 },
  'air.atmosphericPressureKpa': { min: 80, max: 110 },
  'occupancy.generationTable.*.lpsByMet.*': { min: 0.0001, max: 0.05 },
  'occupancy.pupilMetByUse.*': { min: 1, max: 4 },
  'occupancy.pupilMetAdjustByAge.*': { min: -1, max: 1 },
  'occupancy.adultMet': { min: 1, max: 4 },
  'occupancy.timetable.*.startMinute': { min: 0, max: 1440, integer: true, display: 'clock' },
  'occupancy.timetable.*.endMinute': { min: 0, max: 1440, integer: true, display: 'clock' },
  'occupancy.timetable.*.occupancyFraction': share(),
  'seasons.*.months.*': { min: 1, max: 12, integer: true, display: 'months' },
  'seasons.*.schoolDays': { min: 0, max: 366, integer: true },
  'seasons.*.indoorTempC': { min: 10, max: 30, unit: '°C' },
  'seasons.*.windowOpenFractionOccupied': share(),
  'seasons.*.windowOpenFractionEmpty': share(),
  'climate.regions.*.monthlyMeanTempC.*': { min: -30, max: 40, unit: '°C' },
  'climate.regions.*.windSpeedMs.*': { min: 0, max: 30, unit: 'm/s' },
  'climate.dailyRangeK.*': { min: 0, max: 25 },
  'climate.dayToDaySdK.*': { min: 0, max: 10 },
  'windows.dischargeCoefficient': { min: 0.1, max: 1 },
  'windows.openingHeightM': { min: 0.1, max: 5 },
  'windows.effectiveOpeningFactor.*': share(),
  'windows.crossWindDeltaCp': { min: 0, max: 1.5 },
  'windows.siteWindFactor': { min: 0, max: 1.5 },
  'windows.windowUseWithMechanical': share(),
  'windows.frameFactorByMaterial.*': { min: 0.3, max: 1, display: 'percent' },
  'infiltration.kpDivisor': { min: 5, max: 50 },
  'infiltration.envelopeAreaPerFloorArea': { min: 0, max: 10 },
  'infiltration.defaultAirPermeabilityByConstruction.*': { min: 0.5, max: 50 },
  'infiltration.defaultAirPermeabilityByEra.*': { min: 0.5, max: 50 },
  'mechanical.defaultSupplyLpsPerM2': { min: 0, max: 20 },
  'mechanical.existingSystems.*.specificFanPowerWPerLps': { min: 0, max: 5 },
  'mechanical.existingSystems.*.heatRecoveryEfficiency': share(0.95),
  'mechanical.existingMaintenanceShareOfUnits': share(3),
  'criteria.packs.*.meanLimitPpm': { min: 100, max: 10000 },
  'criteria.packs.*.maxLimitPpm': { min: 100, max: 10000 },
  'criteria.packs.*.maxMinutesCap': { min: 0, max: 1440, integer: true },
  'criteria.newBuildFromYear': { min: 1900, max: 2100, integer: true },
  'criteria.referenceThresholdsPpm.*': { min: 100, max: 10000 },
  'risk.farOverShare': { min: 0.01, max: 2, display: 'percent' },
  'risk.scoreHalfPupilHours': { min: 1, max: 1e9 },
  'energy.heatingIndoorTempC': { min: 10, max: 30 },
  'energy.heatingCutoffTempC': { min: 0, max: 30 },
  'energy.airHeatCapacityWPerLpsK': { min: 1, max: 1.4 },
  'energy.heatGeneratorEfficiency.*': { min: 0.3, max: 6 },
  'comfort.glazingUValueWm2K': { min: 0.5, max: 6 },
  'comfort.wallUValueWm2K': { min: 0.1, max: 3 },
  'comfort.shadingFactor': { min: 0, max: 1 },
  'comfort.julyIrradianceWm2.*': { min: 0, max: 400 },
  'comfort.sensibleGainPerPersonW': { min: 20, max: 200 },
  'comfort.equipmentLightingGainW': { min: 0, max: 10000 },
  'comfort.winterClothingClo': { min: 0, max: 2 },
  'comfort.winterRelativeHumidityPct': { min: 0, max: 100 },
  'comfort.winterAirSpeedMs': { min: 0, max: 0.5 },
  'comfort.draughtTurbulencePct': { min: 10, max: 60 },
  'comfort.deskDistanceFromWindowM': { min: 0, max: 10 },
  'comfort.insideSurfaceResistanceM2KW': { min: 0.05, max: 0.5 },
  'comfort.summerNightOpenFraction': share(),
  'comfort.adaptiveCategoryOffsetK': { min: 0, max: 6 },
  'finance.fuelPricesGbpPerKwh.*': { min: 0, max: 2, display: 'pence' },
  'finance.electricityPriceGbpPerKwh': { min: 0, max: 2, display: 'pence' },
  'finance.carbonFactorsKgCo2ePerKwh.*': { min: 0, max: 2 },
  'finance.electricityKgCo2ePerKwh': { min: 0, max: 2 },
  'finance.discountRate': { min: 0, max: 0.2, display: 'percent' },
  'finance.appraisalYears': { min: 1, max: 60, integer: true },
  'retrofit.unitCatalogue.*.nominalFlowLps': { min: 1, max: 5000 },
  'retrofit.unitCatalogue.*.heatRecoveryEfficiency': share(0.99),
  'retrofit.unitCatalogue.*.specificFanPowerWPerLps': { min: 0, max: 5 },
  'retrofit.unitCatalogue.*.installedCostGbp': { min: 0, max: 1e6 },
  'retrofit.unitCatalogue.*.annualMaintenanceGbp': { min: 0, max: 1e5 },
  'retrofit.unitCatalogue.*.lifeYears': { min: 1, max: 60 },
  'retrofit.unitCatalogue.*.soundDbA': { min: 0, max: 100 },
  'retrofit.soundLimitDbA': { min: 0, max: 100 },
  'retrofit.maxUnitsPerRoom': { min: 1, max: 20, integer: true },
  'retrofit.windowKeptWithUnits.*': share(),
  'retrofit.operation.extraRunHoursPerDay': { min: 0, max: 12 },
  'retrofit.simplerOption.capitalBaseGbp': { min: 0, max: 1e6 },
  'retrofit.simplerOption.capitalGbpPerLps': { min: 0, max: 1e4 },
  'retrofit.simplerOption.specificFanPowerWPerLps': { min: 0, max: 5 },
  'retrofit.simplerOption.annualMaintenanceGbp': { min: 0, max: 1e5 },
  'retrofit.simplerOption.lifeYears': { min: 1, max: 60 },
  'defaults.room.ceilingHeightM': { min: 2, max: 12 },
  'defaults.room.floorAreaPerPupilM2': { min: 0.5, max: 20 },
  'defaults.room.adultsInTeachingRoom': { min: 0, max: 10, integer: true },
  'defaults.room.glazingShareOfFloor': share(3),
  'defaults.room.openableShareOfGlazing': share(),
  'defaults.room.glazingGValue': { min: 0.1, max: 0.9 },
};

/** The codes a text assumption may take, by path pattern (shown as a choice, checked by the engine). */
export const ASSUMPTION_CHOICES: Record<string, readonly string[]> = {
  'windows.method': ['warren_parkins', 'de_gids_phaff'],
  'criteria.family': ['bb101_2018', 'en16798_1'],
  'criteria.enCategory': ['I', 'II', 'III', 'IV'],
  'criteria.buildStatus': ['by_year_built', 'new_build', 'refurbishment'],
  'finance.headlineBaseline': BASELINES,
  'retrofit.operation.summerMode': SUMMER_MODES,
  'defaults.room.use': ROOM_USES,
  'defaults.room.windowType': WINDOW_TYPES,
  'defaults.room.ventilationType': VENTILATION_TYPES,
  'occupancy.teachingUses.*': ROOM_USES,
  'mechanical.ventilationClass.*': ['natural', 'mechanical'],
  'mechanical.existingSystems.*.balance': ['none', 'balanced', 'unbalanced'],
};

/** Codes of the age groups, re-exported for the form's row names. */
export const ASSUMPTION_AGE_GROUPS = AGE_GROUPS;

const CHOICE_WORDS: Record<string, string> = {
  warren_parkins: 'Warren & Parkins (1984)',
  de_gids_phaff: 'de Gids & Phaff (1982)',
  bb101_2018: 'BB101 (2018)',
  en16798_1: 'EN 16798-1 categories',
  by_year_built: 'By the year the block was built',
  new_build: 'Always new build',
  refurbishment: 'Always refurbishment',
  natural: 'Natural',
  mechanical: 'Mechanical',
  balanced: 'Balanced (supply and extract)',
  unbalanced: 'One fan',
  I: 'Category I',
  II: 'Category II',
  III: 'Category III',
  IV: 'Category IV',
};

/** Words for a choice code. */
export const choiceWords = (code: string): string => CHOICE_WORDS[code] ?? label(code);

function matches(pattern: string, path: string): boolean {
  const p = pattern.split('.');
  const q = path.split('.');
  return p.length === q.length && p.every((part, i) => part === '*' || part === q[i]);
}

/** The declared range of the number at `path` (e.g. 'seasons.winter.schoolDays'), or null when none is declared. */
export function assumptionLimit(path: string): AssumptionLimit | null {
  const exact = ASSUMPTION_LIMITS[path];
  if (exact) return exact;
  for (const [pattern, limit] of Object.entries(ASSUMPTION_LIMITS)) if (matches(pattern, path)) return limit;
  return null;
}

/** The codes allowed for the text at `path`, or null when it is free text. */
export function assumptionChoices(path: string): readonly string[] | null {
  const exact = ASSUMPTION_CHOICES[path];
  if (exact) return exact;
  for (const [pattern, codes] of Object.entries(ASSUMPTION_CHOICES)) if (matches(pattern, path)) return codes;
  return null;
}

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;

/** Short month names, January first. */
export const MONTH_NAMES: readonly string[] = MONTHS;

const trim = (x: number, decimals: number) => String(Number(x.toFixed(decimals)));

/** A stored number as people type it, without the unit: 0.035 → "3.5" (percent), 0.07 → "7" (pence), 540 → "09:00". */
export function toDisplay(value: number, display: DisplayUnit = 'as_stored'): string {
  switch (display) {
    case 'percent':
      return trim(value * 100, 4);
    case 'pence':
      return trim(value * 100, 4);
    case 'clock':
      return `${String(Math.floor(value / 60)).padStart(2, '0')}:${String(value % 60).padStart(2, '0')}`;
    case 'months':
      return MONTHS[value - 1] ?? String(value);
    default:
      return trim(value, 6);
  }
}

/**
 * The unit people read beside one displayed number: the stored unit unless converted; a table cell's own unit where
 * the limit declares one; per cell of a list by month, the unit without "by month".
 */
export function displayUnit(display: DisplayUnit | undefined, storedUnit: string, cellUnit?: string): string {
  if (display === 'percent') return '%';
  if (display === 'pence') return 'p/kWh';
  if (display === 'clock' || display === 'months') return '';
  const unit = (cellUnit ?? storedUnit).replace(/ by month$/, '');
  return unit === '-' || unit === 'table' || unit === 'list' ? '' : unit;
}

/**
 * What a person typed, back in the stored unit; null when it is not a number (or a time, or a month) at all.
 * Accepts "3.5", "3.5 %", "7p", "09:15", "Sep", "1,200".
 */
export function fromDisplay(text: string, display: DisplayUnit = 'as_stored'): number | null {
  const t = text.trim();
  if (display === 'clock') {
    const m = /^(\d{1,2})[:.](\d{2})$/.exec(t);
    if (!m) return null;
    return Number(m[1]) * 60 + Number(m[2]);
  }
  if (display === 'months') {
    const i = MONTHS.findIndex((name) => t.toLowerCase().startsWith(name.toLowerCase()));
    if (i >= 0) return i + 1;
  }
  const cleaned = t.replace(/,/g, '').replace(/\s*(%|p\/kwh|p|£\/kwh)$/i, '');
  if (cleaned === '' || !/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(cleaned)) return null;
  const n = Number(cleaned);
  if (!Number.isFinite(n)) return null;
  // Twelve significant figures: 24.55 p → 0.2455 £, never 0.24550000000000002.
  return display === 'percent' || display === 'pence' ? Number((n / 100).toPrecision(12)) : n;
}

/** The range in the unit people type, e.g. "between 0 and 20 %" or "between 09:00 and 15:00". */
export function rangeInWords(limit: AssumptionLimit, storedUnit: string): string {
  const unit = displayUnit(limit.display, storedUnit, limit.unit);
  const n = (x: number) =>
    limit.display === 'clock' || limit.display === 'months'
      ? toDisplay(x, limit.display)
      : Number(toDisplay(x, limit.display)).toLocaleString('en-GB', { maximumFractionDigits: 4 });
  return `between ${n(limit.min)} and ${n(limit.max)}${unit ? ` ${unit}` : ''}`;
}

/** Why a typed value cannot be used, in words; null when it can. */
export function checkTyped(text: string, limit: AssumptionLimit, storedUnit: string): string | null {
  const value = fromDisplay(text, limit.display);
  if (value === null)
    return limit.display === 'clock'
      ? 'Enter a time such as 09:15.'
      : limit.display === 'months'
        ? 'Enter a month such as Sep.'
        : 'Enter a number.';
  if (value < limit.min - 1e-12 || value > limit.max + 1e-12) return `Must be ${rangeInWords(limit, storedUnit)}.`;
  if (limit.integer && !Number.isInteger(Math.round(value * 1e9) / 1e9)) return 'Must be a whole number.';
  return null;
}
