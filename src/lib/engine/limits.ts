/**
 * The allowed range of every register field the engine reads, declared once. The engine's input checks, the zod
 * schemas of the API and the import, the database CHECK constraints (copied into their migration, compared by a
 * test) and the template's data validation all derive from this table. Units are in the field names.
 */
import { EngineInputError, requireRange } from './errors';

/** One numeric field's range. */
export interface FieldLimit {
  /** Words a person reads, e.g. 'Floor area'. */
  label: string;
  /** Unit as people write it, e.g. 'm²' ('' for none). */
  unit: string;
  min: number;
  max: number;
  /** Whole numbers only (pupils, years). */
  integer?: boolean;
  /** Why the range is what it is. */
  why: string;
}

/** Room fields. */
export const ROOM_LIMITS = {
  floorAreaM2: {
    label: 'Floor area',
    unit: 'm²',
    min: 1,
    max: 5000,
    why: 'A cupboard to a large sports hall',
  },
  ceilingHeightM: { label: 'Ceiling height', unit: 'm', min: 2, max: 12, why: 'Low rooms to sports halls and atria' },
  pupils: { label: 'Pupils', unit: 'pupils', min: 0, max: 500, integer: true, why: 'Design occupancy, whole pupils' },
  adults: { label: 'Adults', unit: 'adults', min: 0, max: 50, integer: true, why: 'Design occupancy, whole people' },
  orientationDeg: {
    label: 'Orientation',
    unit: '°',
    min: 0,
    max: 359,
    integer: true,
    why: 'A bearing, 0 = north, clockwise',
  },
  glazingAreaM2: { label: 'Glazing area', unit: 'm²', min: 0, max: 5000, why: 'At most three times the floor area' },
  openableAreaM2: { label: 'Openable area', unit: 'm²', min: 0, max: 5000, why: 'At most the glazing area' },
  glazingGValue: {
    label: 'Glazing g-value',
    unit: '',
    min: 0.1,
    max: 0.9,
    why: 'Solar-control glass (about 0.2) to clear single glazing (about 0.85)',
  },
  mechanicalSupplyLps: { label: 'Mechanical supply', unit: 'l/s', min: 0, max: 5000, why: 'Fan flow of one room' },
  winterWindowOpenFraction: {
    label: 'Winter window opening',
    unit: 'share of the openable area',
    min: 0,
    max: 1,
    why: 'Shut (0) to wide open (1) on average while pupils are in',
  },
} as const satisfies Record<string, FieldLimit>;

/** Block fields. */
export const BLOCK_LIMITS = {
  yearBuilt: { label: 'Year built', unit: '', min: 1700, max: 2100, integer: true, why: 'Georgian to future' },
  airPermeabilityM3hM2: {
    label: 'Air permeability',
    unit: 'm³/(h·m²) at 50 Pa',
    min: 0.5,
    max: 50,
    why: 'Passive-house tight to very leaky',
  },
  heatingInstalledYear: { label: 'Heating installed', unit: '', min: 1900, max: 2100, integer: true, why: 'A year' },
  fuelPriceGbpPerKwh: {
    label: 'Fuel price',
    unit: '£/kWh',
    min: 0.001,
    max: 2,
    why: 'Delivered energy price, above zero',
  },
} as const satisfies Record<string, FieldLimit>;

/** School fields (the school's own fuel price shares the block's range). */
export const SCHOOL_LIMITS = {
  fuelPriceGbpPerKwh: BLOCK_LIMITS.fuelPriceGbpPerKwh,
} as const satisfies Record<string, FieldLimit>;

/**
 * Seasonal efficiency of heating plant by fuel: boilers and district heat 0.3–1 (gross seasonal efficiency),
 * direct electric exactly 1 (all electricity becomes heat in the room), heat pumps a seasonal COP of 1–6.
 */
export const HEATING_EFFICIENCY_LIMITS = {
  heat_pump: { label: 'Seasonal COP', unit: '', min: 1, max: 6, why: 'Seasonal COP of a heat pump' },
  electric: { label: 'Heating efficiency', unit: '', min: 1, max: 1, why: 'Direct electric heating is 1' },
  other: { label: 'Heating efficiency', unit: '', min: 0.3, max: 1, why: 'Seasonal efficiency of a boiler' },
} as const satisfies Record<string, FieldLimit>;

/** The efficiency limits that apply to a fuel. */
export function heatingEfficiencyLimit(fuel: string): FieldLimit {
  return fuel === 'heat_pump'
    ? HEATING_EFFICIENCY_LIMITS.heat_pump
    : fuel === 'electric'
      ? HEATING_EFFICIENCY_LIMITS.electric
      : HEATING_EFFICIENCY_LIMITS.other;
}

/**
 * The densest a room can be occupied, m² of floor per person. Approved Document B (2019) Table D1 floor space
 * factors give 0.3–0.5 m² a person for standing spaces (from memory); a school room never holds more than
 * 2 people per m².
 */
export const MIN_FLOOR_AREA_PER_OCCUPANT_M2 = 0.5;

/** Glazing can be at most this many times the floor area (a fully glazed small room). */
export const MAX_GLAZING_PER_FLOOR_AREA = 3;

/** A range in words, e.g. 'between 1 and 5,000 m²'. */
export function rangeWords(limit: FieldLimit): string {
  const n = (x: number) => x.toLocaleString('en-GB', { maximumFractionDigits: 3 });
  const unit = limit.unit && !limit.unit.includes(' ') ? ` ${limit.unit}` : '';
  return limit.min === limit.max
    ? `exactly ${n(limit.min)}${unit}`
    : `between ${n(limit.min)} and ${n(limit.max)}${unit}`;
}

/** The message people read when a value is outside its range. */
export function limitMessage(limit: FieldLimit): string {
  return `${limit.label} must be ${limit.integer ? 'a whole number ' : ''}${rangeWords(limit)}.`;
}

/** Throws EngineInputError naming `field` unless `value` is within the limit (and whole when it must be). */
export function requireWithin(field: string, value: number, limit: FieldLimit): number {
  if (value >= limit.min && value <= limit.max && (!limit.integer || Number.isInteger(value))) return value;
  requireRange(field, value, limit.min, limit.max, limit.unit.includes(' ') ? '' : limit.unit);
  if (limit.integer && !Number.isInteger(value))
    throw new EngineInputError(field, `must be a whole number, got ${value}`);
  return value;
}
