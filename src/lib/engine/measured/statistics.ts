/** Small order statistics shared by the measured-CO2 methods, and their per-season summary of event rates. */
import type { AirChangeEstimate, Confidence, MethodNote } from './types';

/** Quantile q (0–1) of the values by linear interpolation between order statistics; NaN when empty. */
export function quantile(values: readonly number[], q: number): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const at = q * (sorted.length - 1);
  const lo = Math.floor(at);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return (sorted[lo] as number) + ((sorted[hi] as number) - (sorted[lo] as number)) * (at - lo);
}

/** Median of the values; NaN when empty. */
export const median = (values: readonly number[]): number => quantile(values, 0.5);

/** Interquartile range; 0 for fewer than two values. */
export const iqr = (values: readonly number[]): number =>
  values.length < 2 ? 0 : quantile(values, 0.75) - quantile(values, 0.25);

/** Even sample of at most `max` items, first and last included. */
export function evenSample<T>(items: readonly T[], max: number): T[] {
  if (items.length <= max) return [...items];
  const out: T[] = [];
  for (let i = 0; i < max; i++) out.push(items[Math.round((i * (items.length - 1)) / (max - 1))] as T);
  return out;
}

/**
 * A season's air-change estimate from its events (decays or build-ups): the median rate, its interquartile
 * spread, the median fit quality, and the method's confidence rule applied to them.
 */
export function summariseRates(args: {
  rates: readonly number[];
  qualities: readonly number[];
  rejected: number;
  volumeM3: number;
  confidence: (events: number, medianQuality: number, relativeIqr: number) => Confidence;
  note: MethodNote;
}): AirChangeEstimate | null {
  if (args.rates.length === 0) return null;
  const ach = median(args.rates);
  const spread = iqr(args.rates);
  const quality = median(args.qualities);
  return {
    achPerH: ach,
    flowLps: (ach * args.volumeM3) / 3.6,
    events: args.rates.length,
    rejected: args.rejected,
    iqrAchPerH: spread,
    fitQuality: quality,
    confidence: args.confidence(args.rates.length, quality, ach > 0 ? spread / ach : Number.POSITIVE_INFINITY),
    note: args.note,
  };
}
