/**
 * Outdoor CO2 as the room's own sensor sees it: a low percentile of the night-time minima (midnight to 06:00).
 * With the room empty overnight, CO2 decays towards outdoor air; a low percentile keeps nights that did not
 * decay fully (tight rooms, long evenings) from lifting the estimate, and weekends and holidays come closest.
 * Method: Batterman (2017) IJERPH 14(2):145, on estimating outdoor CO2 from the logged data; the 10th
 * percentile and the plausibility range are common practice, no single source. Many low-cost sensors
 * auto-calibrate their minimum to about 400 ppm, so a baseline far from the assumption set's value means
 * the sensor, not the outdoor air, should be checked.
 */
import { quantile } from './statistics';
import type { BaselineEstimate, Confidence } from './types';

/** Percentile of the nightly minima taken as the outdoor level. */
export const BASELINE_PERCENTILE = 0.1;
/** Outdoor CO2 a UK sensor can plausibly read, ppm (common practice: 410–450 typical, allowing calibration offsets). */
export const PLAUSIBLE_OUTDOOR_PPM = { min: 350, max: 500 } as const;

export const BASELINE_NOTE = {
  method: '10th percentile over nights of the lowest 30-minute mean between 00:00 and 06:00',
  source: 'Batterman (2017) IJERPH 14(2):145 (outdoor CO2 from logged data); percentile: common practice',
};

/** The baseline from nightly minima, or the assumed outdoor CO2 with a reason when the log cannot give one. */
export function outdoorBaseline(nightMinimaPpm: readonly number[], assumedOutdoorPpm: number): BaselineEstimate {
  const nights = nightMinimaPpm.length;
  if (nights < 3)
    return {
      ppm: assumedOutdoorPpm,
      basis: 'assumed',
      nights,
      confidence: 'none',
      warning: `Fewer than 3 nights logged: the assumption set's outdoor CO2 (${assumedOutdoorPpm} ppm) is used.`,
      note: BASELINE_NOTE,
    };
  const ppm = quantile(nightMinimaPpm, BASELINE_PERCENTILE);
  if (ppm < PLAUSIBLE_OUTDOOR_PPM.min || ppm > PLAUSIBLE_OUTDOOR_PPM.max)
    return {
      ppm: assumedOutdoorPpm,
      basis: 'assumed',
      nights,
      confidence: 'none',
      warning: `The sensor's night-time minimum is about ${Math.round(ppm)} ppm, outside the ${PLAUSIBLE_OUTDOOR_PPM.min}–${PLAUSIBLE_OUTDOOR_PPM.max} ppm outdoor air can plausibly read: check its calibration. The assumption set's ${assumedOutdoorPpm} ppm is used.`,
      note: BASELINE_NOTE,
    };
  const confidence: Confidence = nights >= 14 ? 'high' : nights >= 5 ? 'medium' : 'low';
  return { ppm, basis: 'night_minima', nights, confidence, warning: null, note: BASELINE_NOTE };
}
