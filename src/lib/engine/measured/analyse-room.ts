/**
 * One room's logged CO2 analysed per season: occupied-period statistics against the room's criterion, the
 * outdoor baseline, and the air-change rate by the decay and build-up methods, each with its confidence.
 */
import type { AppliedCriterion, Season, TimetableSegment } from '../types';
import { outdoorBaseline } from './baseline';
import { fitBuildUp, lessonWindows, riseRatePpmPerH, summariseBuildUps, type BuildUpFit } from './build-up';
import { findDecays, summariseDecays, type DecayEvent } from './decay';
import { GOOD_DAY_COVERAGE, measureDay, medianStepMinutes, occupiedWindow, type DayContext } from './day-measure';
import { evenSample, median, quantile } from './statistics';
import type { Confidence, DayMeasure, MeasuredDay, MeasuredRoom, MeasuredSeason, MeasuredThreshold } from './types';

const SEASONS: readonly Season[] = ['winter', 'mid', 'summer'];

/** Most lessons fitted per room and season, spread evenly over its days (bounds the fitting time). */
export const MAX_BUILD_UPS_PER_SEASON = 40;
/** Good days a season needs before its measured risk replaces the model's [CP, an Airtally rule]. */
export const MIN_DAYS_FOR_MEASURED_RISK = 10;
/** Thresholds always measured besides the criterion's, ppm (the 1,000 and 1,500). */
export const REFERENCE_THRESHOLDS_PPM = [1000, 1500] as const;

export const OCCUPIED_MEAN_NOTE = {
  method: 'Mean over school days of each day’s time-weighted mean over the occupied period (breaks and lunch included)',
  source: 'ESFA (2018) Building Bulletin 101, daily mean over the occupied period (via secondary summaries)',
};
export const SHARE_ABOVE_NOTE = {
  method: 'Share of the occupied period’s logged time above 1,000 and 1,500 ppm, each reading held until the next',
  source: 'Common practice, no single source',
};
export const LONGEST_RUN_NOTE = {
  method: 'Longest uninterrupted time above the criterion’s maximum in the occupied period, a gap ending the run',
  source: 'ESFA (2018) Building Bulletin 101, 20-consecutive-minute rule (via secondary summaries)',
};

/** What the analysis of one room needs besides its readings. */
export interface RoomAnalysisInput {
  days: readonly MeasuredDay[];
  timetable: readonly TimetableSegment[];
  volumeM3: number;
  /** CO2 generation of the register's occupants at full occupancy and room temperature, per season, L/s. */
  generationLpsBySeason: Record<Season, number>;
  criterion: AppliedCriterion;
  assumedOutdoorPpm: number;
}

/** Thresholds measured for a criterion: 1,000 and 1,500 ppm, its mean limit and its maximum, ascending. */
export function measuredThresholds(criterion: AppliedCriterion): number[] {
  const list = [...REFERENCE_THRESHOLDS_PPM, criterion.meanLimitPpm];
  if (criterion.maxLimitPpm !== null) list.push(criterion.maxLimitPpm);
  return [...new Set(list)].sort((a, b) => a - b);
}

/** Longest time one reading stands for: 2.5 × the room's typical logging interval, at least 2.5 minutes [CP]. */
export function maxHoldFor(days: readonly MeasuredDay[]): number {
  const steps = days.map((d) => medianStepMinutes(d.elapsedMin)).filter(Number.isFinite);
  const step = steps.length > 0 ? median(steps) : 5;
  return Math.max(2.5, 2.5 * step);
}

function occupiedConfidence(days: number): Confidence {
  return days >= 20 ? 'high' : days >= MIN_DAYS_FOR_MEASURED_RISK ? 'medium' : days > 0 ? 'low' : 'none';
}

/** Analyses one room: per-day statistics (for the day lists) and the per-season measured picture. */
export function analyseRoom(input: RoomAnalysisInput): { room: MeasuredRoom; days: DayMeasure[] } {
  const thresholds = measuredThresholds(input.criterion);
  const maxHoldMinutes = maxHoldFor(input.days);
  const ctx: DayContext = { timetable: input.timetable, thresholdsPpm: thresholds, maxHoldMinutes };
  const window = occupiedWindow(input.timetable);
  const windowMinutes = window.end - window.start;
  const measures = input.days.map((d) => measureDay(d, ctx));
  const seasons: Partial<Record<Season, MeasuredSeason>> = {};
  let totalDays = 0;
  for (const season of SEASONS) {
    const idx = measures.map((m, i) => (m.season === season ? i : -1)).filter((i) => i >= 0);
    if (idx.length === 0) continue;
    const good = idx.filter((i) => measures[i]!.occupied && measures[i]!.coverage >= GOOD_DAY_COVERAGE);
    const usable = idx.filter((i) => measures[i]!.occupied);
    totalDays += good.length;
    const dailyMeans = good.map((i) => measures[i]!.occupiedMeanPpm as number);
    const coveredMinutes = good.reduce((sum, i) => sum + measures[i]!.coverage * windowMinutes, 0);
    const perThreshold: MeasuredThreshold[] = thresholds.map((th, k) => {
      const over = good.reduce((sum, i) => sum + (measures[i]!.minutesOver[k] as number), 0);
      const occupiedOver = good.reduce((sum, i) => sum + (measures[i]!.occupiedMinutesOver[k] as number), 0);
      const runs = good.map((i) => measures[i]!.longestRunMinutes[k] as number);
      return {
        thresholdPpm: th,
        shareAbove: coveredMinutes > 0 ? over / coveredMinutes : 0,
        occupiedMinutesOverPerDay: good.length > 0 ? occupiedOver / good.length : 0,
        longestRunMinutesMax: runs.length > 0 ? Math.max(...runs) : 0,
        longestRunMinutesMedianDay: runs.length > 0 ? median(runs) : 0,
      };
    });
    const occupiedMean = dailyMeans.length > 0 ? dailyMeans.reduce((a, b) => a + b, 0) / dailyMeans.length : null;
    const maxEntry =
      input.criterion.maxLimitPpm === null
        ? null
        : perThreshold.find((t) => t.thresholdPpm === input.criterion.maxLimitPpm);
    const meanMet = occupiedMean === null ? null : occupiedMean <= input.criterion.meanLimitPpm;
    const maxMet =
      good.length === 0
        ? null
        : maxEntry
          ? maxEntry.longestRunMinutesMedianDay <= (input.criterion.maxMinutesCap ?? 0)
          : true;

    const nightMinima = idx.map((i) => measures[i]!.nightMinPpm).filter((v): v is number => v !== null);
    const baseline = outdoorBaseline(nightMinima, input.assumedOutdoorPpm);

    const decays: DecayEvent[] = [];
    let decayRejected = 0;
    for (const i of usable) {
      const found = findDecays({
        day: input.days[i]!,
        timetable: input.timetable,
        outdoorPpm: baseline.ppm,
        maxHoldMinutes,
      });
      decays.push(...found.events);
      decayRejected += found.rejected;
    }
    const lessons = good.flatMap((i) =>
      lessonWindows({ day: input.days[i]!, timetable: input.timetable, maxHoldMinutes }),
    );
    const sampled = evenSample(lessons, MAX_BUILD_UPS_PER_SEASON);
    const fits: BuildUpFit[] = [];
    for (const lesson of sampled) {
      const rise = riseRatePpmPerH(input.generationLpsBySeason[season] * lesson.occupancyFraction, input.volumeM3);
      const fit = fitBuildUp(lesson.hours, lesson.ppm, baseline.ppm, rise);
      if (fit && fit.rmsPpm <= 150) fits.push(fit);
    }
    const peaks = good.map((i) => measures[i]!.maxPpm);
    seasons[season] = {
      season,
      days: good.length,
      daysWithReadings: idx.length,
      readings: idx.reduce((sum, i) => sum + measures[i]!.readings, 0),
      occupiedMeanPpm: occupiedMean,
      dailyMeanP10Ppm: dailyMeans.length > 0 ? quantile(dailyMeans, 0.1) : null,
      dailyMeanP90Ppm: dailyMeans.length > 0 ? quantile(dailyMeans, 0.9) : null,
      peakPpm: peaks.length > 0 ? Math.max(...peaks) : null,
      thresholds: perThreshold,
      meanMet,
      maxMet,
      criterionMet: meanMet === null || maxMet === null ? null : meanMet && maxMet,
      occupiedStatsConfidence: occupiedConfidence(good.length),
      baseline,
      decayInDay: summariseDecays(
        decays.filter((d) => d.kind === 'in_day'),
        decayRejected,
        input.volumeM3,
      ),
      decayAfterSchool: summariseDecays(
        decays.filter((d) => d.kind === 'after_school'),
        0,
        input.volumeM3,
      ),
      buildUp: summariseBuildUps(fits, sampled.length - fits.length, input.volumeM3),
      notes: [OCCUPIED_MEAN_NOTE, SHARE_ABOVE_NOTE, LONGEST_RUN_NOTE],
    };
  }
  const dates = input.days.map((d) => d.date).sort();
  return {
    room: { seasons, days: totalDays, firstDate: dates[0] ?? null, lastDate: dates[dates.length - 1] ?? null },
    days: measures,
  };
}
