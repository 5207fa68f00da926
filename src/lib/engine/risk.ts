/**
 * Risk: pupil-hours a year above the room's criterion threshold, four bands of our own naming and a
 * one-sentence reason. An Airtally screening rule: no published banding exists for this measure.
 */
import { formatInt, formatOneDecimal } from './format';
import type { RiskBand, RiskResult, Season } from './types';

/** Words a person reads for each band. */
export const RISK_BAND_LABELS: Record<RiskBand, string> = {
  fresh: 'Fresh',
  stuffy: 'Stuffy at times',
  stale: 'Often stale',
  very_stale: 'Stale most days',
};

const SEASON_WORDS: Record<Season, string> = { winter: 'winter', mid: 'spring and autumn', summer: 'summer' };

/**
 * Pupil-hours a year above a threshold: Σ_seasons pupils · (occupancy-weighted minutes above per day / 60) · school days.
 */
export function pupilHoursPerYear(args: {
  pupils: number;
  perSeason: readonly { occupiedMinutesOver: number; schoolDays: number }[];
}): number {
  let total = 0;
  for (const s of args.perSeason) total += (args.pupils * s.occupiedMinutesOver * s.schoolDays) / 60;
  return total;
}

/** Band from pupil-hours: below the first limit 'fresh', … , at or above the third 'very_stale'. */
export function riskBand(pupilHours: number, upper: readonly [number, number, number]): RiskBand {
  if (pupilHours < upper[0]) return 'fresh';
  if (pupilHours < upper[1]) return 'stuffy';
  if (pupilHours < upper[2]) return 'stale';
  return 'very_stale';
}

/** Score in [0, 1): P/(P + P_half); 0.5 at P_half, rises with exposure and never reaches 1. */
export function riskScore(pupilHours: number, halfPupilHours: number): number {
  return pupilHours / (pupilHours + halfPupilHours);
}

/** The risk result with its plain-language reason. */
export function assessRisk(args: {
  pupils: number;
  openableAreaM2: number;
  mechanicalLps: number;
  pupilHours: number;
  thresholdPpm: number;
  bandUpper: readonly [number, number, number];
  halfPupilHours: number;
  worstSeason: Season;
  worstMeanPpm: number;
  runThresholdPpm: number;
  worstRunMinutes: number;
}): RiskResult {
  const band = riskBand(args.pupilHours, args.bandUpper);
  const supply = args.mechanicalLps > 0 ? ` and ${formatInt(args.mechanicalLps)} l/s mechanical supply` : '';
  const run =
    args.worstRunMinutes >= 1
      ? `over ${formatInt(args.runThresholdPpm)} ppm for ${formatInt(args.worstRunMinutes)} minutes in a row`
      : `never over ${formatInt(args.runThresholdPpm)} ppm`;
  const reason =
    `${formatInt(args.pupils)} pupils, ${formatOneDecimal(args.openableAreaM2)} m² openable window${supply}: ` +
    `${SEASON_WORDS[args.worstSeason]} mean ${formatInt(args.worstMeanPpm)} ppm, ${run}; ` +
    `about ${formatInt(args.pupilHours)} pupil-hours a year above ${formatInt(args.thresholdPpm)} ppm.`;
  return {
    pupilHoursPerYearAbove: args.pupilHours,
    thresholdPpm: args.thresholdPpm,
    band,
    bandLabel: RISK_BAND_LABELS[band],
    score: riskScore(args.pupilHours, args.halfPupilHours),
    reason,
  };
}
