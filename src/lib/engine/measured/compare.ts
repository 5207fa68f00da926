/**
 * Prediction meets measurement: the measured occupied-period mean of each season against the model's for the
 * same season. A room contradicts the model when, in a season with enough readings, the two differ by more
 * than a stated margin (ppm), in either direction: the room is staler than the model says, or fresher.
 * An Airtally screening rule.
 */
import type { RoomAssessment, Season } from '../types';
import type { MeasuredRoom } from './types';

/** Margin used unless the person chooses another, ppm on the occupied-period mean [CP, an Airtally rule]. */
export const DEFAULT_MARGIN_PPM = 200;
/** Good days a season needs to be compared. */
export const MIN_DAYS_TO_COMPARE = 5;

/** One season side by side. */
export interface SeasonComparison {
  season: Season;
  days: number;
  measuredMeanPpm: number;
  predictedMeanPpm: number;
  /** Measured minus predicted, ppm. */
  differencePpm: number;
  measuredCriterionMet: boolean | null;
  predictedCriterionMet: boolean;
}

/** One room side by side; `direction` from the season that differs most. */
export interface RoomComparison {
  seasons: SeasonComparison[];
  largest: SeasonComparison | null;
  direction: 'staler_than_predicted' | 'fresher_than_predicted' | 'agrees' | 'not_enough_readings';
}

/** Compares a room's measured seasons with its assessment. */
export function compareWithModel(
  measured: MeasuredRoom,
  assessment: RoomAssessment,
  marginPpm: number,
): RoomComparison {
  const seasons: SeasonComparison[] = [];
  for (const season of ['winter', 'mid', 'summer'] as const) {
    const m = measured.seasons[season];
    if (!m || m.days < MIN_DAYS_TO_COMPARE || m.occupiedMeanPpm === null) continue;
    const p = assessment.seasons[season];
    seasons.push({
      season,
      days: m.days,
      measuredMeanPpm: m.occupiedMeanPpm,
      predictedMeanPpm: p.occupiedMeanCo2Ppm,
      differencePpm: m.occupiedMeanPpm - p.occupiedMeanCo2Ppm,
      measuredCriterionMet: m.criterionMet,
      predictedCriterionMet: p.criterionMet,
    });
  }
  let largest: SeasonComparison | null = null;
  for (const s of seasons) if (!largest || Math.abs(s.differencePpm) > Math.abs(largest.differencePpm)) largest = s;
  const direction =
    largest === null
      ? 'not_enough_readings'
      : largest.differencePpm > marginPpm
        ? 'staler_than_predicted'
        : largest.differencePpm < -marginPpm
          ? 'fresher_than_predicted'
          : 'agrees';
  return { seasons, largest, direction };
}

/**
 * The measured occupied-period mean of the room's stalest season among those with enough good days to
 * compare (MIN_DAYS_TO_COMPARE), to set beside the model's worst-season mean; null without such a season.
 */
export function worstMeasuredSeasonMean(
  measured: MeasuredRoom,
): { season: Season; meanPpm: number; days: number } | null {
  let worst: { season: Season; meanPpm: number; days: number } | null = null;
  for (const s of Object.values(measured.seasons)) {
    if (!s || s.occupiedMeanPpm === null || s.days < MIN_DAYS_TO_COMPARE) continue;
    if (!worst || s.occupiedMeanPpm > worst.meanPpm)
      worst = { season: s.season, meanPpm: s.occupiedMeanPpm, days: s.days };
  }
  return worst;
}
