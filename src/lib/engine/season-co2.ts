/**
 * CO2 over one representative school day of a season (the exact piecewise mass balance of co2-mass-balance.ts)
 * and what it means against the room's criterion and the retrofit target (BB101 2018 or EN 16798-1 packs).
 */
import { airChangeRatePerH, simulateDay, steadyStateCo2Ppm } from './co2-mass-balance';
import type { PreparedDay } from './prepared';
import type { AppliedCriterion, CurvePoint, Season, SeasonAssessment, ThresholdExceedance } from './types';
import { fillDaySegments, occupiedTotalLps, type SeasonFlows } from './ventilation';

/** True when a day meets a criterion: mean at or below its limit and no run above its maximum longer than the cap. */
export function meetsCriterion(
  criterion: AppliedCriterion,
  meanPpm: number,
  thresholds: readonly ThresholdExceedance[],
  thresholdsPpm: readonly number[],
): { meanMet: boolean; maxMet: boolean; maxEntry: ThresholdExceedance | null } {
  const maxEntry =
    criterion.maxLimitPpm === null ? null : (thresholds[thresholdsPpm.indexOf(criterion.maxLimitPpm)] ?? null);
  return {
    meanMet: meanPpm <= criterion.meanLimitPpm,
    maxMet: maxEntry === null || maxEntry.longestRunMinutes <= (criterion.maxMinutesCap ?? 0),
    maxEntry,
  };
}

/** True when a day meets a criterion (meetsCriterion's verdict without the parts). */
export function criterionMetBy(
  criterion: AppliedCriterion,
  meanPpm: number,
  thresholds: readonly ThresholdExceedance[],
  thresholdsPpm: readonly number[],
): boolean {
  if (meanPpm > criterion.meanLimitPpm) return false;
  if (criterion.maxLimitPpm === null) return true;
  const entry = thresholds[thresholdsPpm.indexOf(criterion.maxLimitPpm)];
  return entry === undefined || entry.longestRunMinutes <= (criterion.maxMinutesCap ?? 0);
}

/** One season's day: CO2 mean, peak, runs above each threshold, and the criterion and target verdicts. */
export function assessSeasonDay(args: {
  season: Season;
  day: PreparedDay;
  flows: SeasonFlows;
  generationLps: number;
  volumeM3: number;
  outdoorCo2Ppm: number;
  outdoorTempC: number;
  indoorTempC: number;
  windSpeed10Ms: number;
  windowOpenFraction: number;
  thresholdsPpm: readonly number[];
  criterion: AppliedCriterion;
  target: AppliedCriterion;
  withCurve: boolean;
}): { assessment: SeasonAssessment; meetsTarget: boolean } {
  const { flows, criterion, target } = args;
  const curve: CurvePoint[] | null = args.withCurve ? [] : null;
  const day = simulateDay({
    segments: fillDaySegments(args.day.segments, args.day.timetable, args.generationLps, flows),
    volumeM3: args.volumeM3,
    outdoorCo2Ppm: args.outdoorCo2Ppm,
    startPpm: args.outdoorCo2Ppm,
    thresholdsPpm: args.thresholdsPpm,
    curve,
  });
  const totalLps = occupiedTotalLps(flows);
  const own = meetsCriterion(criterion, day.meanPpm, day.thresholds, args.thresholdsPpm);
  return {
    meetsTarget: criterionMetBy(target, day.meanPpm, day.thresholds, args.thresholdsPpm),
    assessment: {
      season: args.season,
      outdoorTempC: args.outdoorTempC,
      indoorTempC: args.indoorTempC,
      windSpeedMs: args.windSpeed10Ms,
      windowOpenFraction: args.windowOpenFraction,
      ventilation: {
        windowLps: flows.windowOccupiedLps,
        infiltrationLps: flows.infiltrationLps,
        mechanicalLps: flows.balancedLps + flows.unbalancedLps,
        totalLps,
      },
      airChangesPerHour: airChangeRatePerH(totalLps, args.volumeM3),
      generationLps: args.generationLps,
      steadyStateCo2Ppm:
        totalLps > 0
          ? steadyStateCo2Ppm({
              outdoorCo2Ppm: args.outdoorCo2Ppm,
              generationLps: args.generationLps,
              flowLps: totalLps,
            })
          : Number.MAX_VALUE,
      occupiedMeanCo2Ppm: day.meanPpm,
      peakCo2Ppm: day.peakPpm,
      thresholds: day.thresholds,
      longestRunAboveMaxMinutes: own.maxEntry ? own.maxEntry.longestRunMinutes : 0,
      minutesOverMax: own.maxEntry ? own.maxEntry.minutesOver : 0,
      meanMet: own.meanMet,
      maxMet: own.maxMet,
      criterionMet: own.meanMet && own.maxMet,
      curve: curve ?? [],
    },
  };
}

/** Occupancy-weighted minutes a day above `thresholdPpm` with these flows (for pupil-hours after a retrofit). */
export function minutesAboveThreshold(args: {
  day: PreparedDay;
  flows: SeasonFlows;
  generationLps: number;
  volumeM3: number;
  outdoorCo2Ppm: number;
  thresholdPpm: number;
}): number {
  const day = simulateDay({
    segments: fillDaySegments(args.day.segments, args.day.timetable, args.generationLps, args.flows),
    volumeM3: args.volumeM3,
    outdoorCo2Ppm: args.outdoorCo2Ppm,
    startPpm: args.outdoorCo2Ppm,
    thresholdsPpm: [args.thresholdPpm],
  });
  return day.thresholds[0]?.occupiedMinutesOver ?? 0;
}
