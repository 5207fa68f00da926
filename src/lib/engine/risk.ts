/**
 * Risk: how far and how long a room is above its CO2 criterion, banded and named for exactly that, with the exposure
 * (pupil-hours a year above the criterion's threshold) kept as a separate figure that drives the risk score and the
 * ranking. The band rule is an Airtally screening rule (common practice, no single source): the criterion itself is
 * published (BB101 (2018) daily mean and 20-minute maximum; EN 16798-1:2019 categories), the bands around it are ours.
 */
import { formatInt, formatOneDecimal } from './format';
import type { RiskBand, RiskResult, Season } from './types';

/** The bands, least concern first (their stored number is their position + 1). */
export const RISK_BANDS: readonly RiskBand[] = ['meets', 'peaks_over', 'over', 'far_over'];

/** Words a person reads for each band: what the room does against its criterion, never a feeling about the air. */
export const RISK_BAND_LABELS: Record<RiskBand, string> = {
  meets: 'Meets its criterion',
  peaks_over: 'Peaks over the limit',
  over: 'Daily mean over the limit',
  far_over: 'Daily mean far over the limit',
};

/** The rule of each band in one sentence, for hover text, the room page and the exports. */
export const RISK_BAND_RULES: Record<RiskBand, string> = {
  meets:
    'In every season the daily mean CO2 stays within the criterion and any peak above its maximum is shorter than allowed.',
  peaks_over:
    'The daily mean stays within the criterion in every season, but CO2 stays above the criterion’s maximum for longer than allowed in a row.',
  over: 'In at least one season the daily mean CO2 is above the criterion’s limit, by less than the far-over margin (a quarter of the limit unless the assumptions say otherwise).',
  far_over:
    'In at least one season the daily mean CO2 is above the criterion’s limit by the far-over margin or more (a quarter of the limit unless the assumptions say otherwise).',
};

/** Stored number of a band (room_results.risk_band): 1 meets … 4 far over, so higher is worse. */
export const riskBandNumber = (band: RiskBand): number => RISK_BANDS.indexOf(band) + 1;

/** The band of a stored number (1–4); numbers outside are taken as the nearest band. */
export const riskBandOfNumber = (n: number): RiskBand =>
  RISK_BANDS[Math.min(RISK_BANDS.length, Math.max(1, Math.round(n))) - 1] as RiskBand;

/**
 * The priority people read for a band, numbered the way estates condition surveys number work: 1 = most urgent
 * (far over the limit) … 4 = no action for air (meets its criterion).
 */
export const riskPriority = (band: RiskBand): number => RISK_BANDS.length - RISK_BANDS.indexOf(band);

/** "Priority 1 · Daily mean far over the limit". */
export const riskBandTitle = (band: RiskBand): string => `Priority ${riskPriority(band)} · ${RISK_BAND_LABELS[band]}`;

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

/** One season's criterion measures: the daily mean over the occupied period and the longest run above the maximum. */
export interface SeasonCriterionMeasures {
  occupiedMeanCo2Ppm: number;
  /** Longest uninterrupted run above the criterion's maximum, minutes (0 when the criterion has no maximum). */
  longestRunAboveMaxMinutes: number;
}

/**
 * The band from the criterion measures (how far and how long above the criterion):
 * - 'far_over' when some season's daily mean is at least (1 + farOverShare) × the mean limit;
 * - 'over' when some season's daily mean is above the mean limit;
 * - 'peaks_over' when every daily mean is within the limit but some season's run above the maximum exceeds the cap;
 * - 'meets' otherwise (the same test as the criterion: BB101 (2018) daily mean, and no more than 20 consecutive
 *   minutes above the maximum).
 * An Airtally screening rule (common practice, no single source); farOverShare is an assumption (0.25 by default).
 */
export function criterionBand(args: {
  seasons: readonly SeasonCriterionMeasures[];
  meanLimitPpm: number;
  maxMinutesCap: number | null;
  farOverShare: number;
}): RiskBand {
  let worstMean = Number.NEGATIVE_INFINITY;
  let longestRun = 0;
  for (const s of args.seasons) {
    if (s.occupiedMeanCo2Ppm > worstMean) worstMean = s.occupiedMeanCo2Ppm;
    if (s.longestRunAboveMaxMinutes > longestRun) longestRun = s.longestRunAboveMaxMinutes;
  }
  if (worstMean >= args.meanLimitPpm * (1 + args.farOverShare)) return 'far_over';
  if (worstMean > args.meanLimitPpm) return 'over';
  if (longestRun > (args.maxMinutesCap ?? 0)) return 'peaks_over';
  return 'meets';
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
  band: RiskBand;
  halfPupilHours: number;
  worstSeason: Season;
  worstMeanPpm: number;
  runThresholdPpm: number;
  worstRunMinutes: number;
}): RiskResult {
  const band = args.band;
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
