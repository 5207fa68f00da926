/**
 * Which blocks' fossil-fuel heating is near the end of its life, so that ventilation work could join a
 * heating-replacement bid. A screening rule of our own: boilers and their plant are commonly replaced after
 * about 20–25 years (common practice, no single source); we take the shorter end and look 5 years ahead.
 */
import type { HeatingRenewalFlag } from './portfolio.types';

/** Typical life of a fossil-fuel heating plant, years (common practice: 20–25; we use the shorter end). */
export const TYPICAL_PLANT_LIFE_YEARS = 20;
/** How far ahead a plant's expected end of life counts as "near", years. */
export const RENEWAL_HORIZON_YEARS = 5;
/** Fuels whose plant a decarbonisation bid would replace. */
export const FOSSIL_FUELS = ['gas', 'oil', 'lpg'] as const;

/** The flag for a block's heating, or null when it is not fossil-fuelled, not dated, or not near its end. */
export function heatingRenewalFlag(args: {
  fuel: string | null;
  installedYear: number | null;
  currentYear: number;
}): HeatingRenewalFlag | null {
  const { fuel, installedYear, currentYear } = args;
  if (!fuel || installedYear === null || !(FOSSIL_FUELS as readonly string[]).includes(fuel)) return null;
  const expectedEndYear = installedYear + TYPICAL_PLANT_LIFE_YEARS;
  if (expectedEndYear > currentYear + RENEWAL_HORIZON_YEARS) return null;
  return { fuel, installedYear, expectedEndYear };
}

/** The rule in words, for the finance page and export. */
export const HEATING_RENEWAL_WORDS =
  `Flagged: blocks heated by gas, oil or LPG whose plant reaches ${TYPICAL_PLANT_LIFE_YEARS} years of age within ` +
  `${RENEWAL_HORIZON_YEARS} years (installed year + ${TYPICAL_PLANT_LIFE_YEARS}). Heating plant is commonly replaced after ` +
  `about 20–25 years; this is common practice, not a survey of the plant's condition.`;
