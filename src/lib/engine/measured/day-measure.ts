/**
 * Statistics of one logged day over the school's occupied period: the time-weighted mean (BB101 (2018): the
 * daily mean over the occupied period, breaks and lunch inside it), time above thresholds and the longest
 * uninterrupted run above each (BB101's 20-consecutive-minute rule). Each reading stands for the time until
 * the next one (sample and hold), at most `maxHoldMinutes`; a longer gap holds nothing and breaks every run.
 * Sample-and-hold and the gap rule are common practice, no single source.
 */
import type { TimetableSegment } from '../types';
import type { DayMeasure, MeasuredDay } from './types';

/** Settings shared by every day of a room's analysis. */
export interface DayContext {
  timetable: readonly TimetableSegment[];
  /** Thresholds to measure, ppm, ascending. */
  thresholdsPpm: readonly number[];
  /** Longest time one reading may stand for, minutes (2.5 × the logging interval). */
  maxHoldMinutes: number;
}

/** Rise of the occupied period above the day's lowest reading that marks pupils in, ppm [CP]. */
export const OCCUPIED_RISE_PPM = 200;
/** Share of the occupied period a day must cover to count in the season's statistics [CP]. */
export const GOOD_DAY_COVERAGE = 0.75;

/** Night-time for the outdoor baseline: midnight to 06:00, smoothed over 30 minutes [CP]. */
const NIGHT_END_MINUTE = 360;
const NIGHT_SMOOTHING_MINUTES = 30;

/** First and last minute of the timetable (the occupied period, breaks included). */
export function occupiedWindow(timetable: readonly TimetableSegment[]): { start: number; end: number } {
  let start = Number.POSITIVE_INFINITY;
  let end = Number.NEGATIVE_INFINITY;
  for (const s of timetable) {
    if (s.startMinute < start) start = s.startMinute;
    if (s.endMinute > end) end = s.endMinute;
  }
  return { start, end };
}

/** Share of design occupancy present at a wall-clock minute (0 outside the timetable). */
export function occupancyAt(timetable: readonly TimetableSegment[], wallMinute: number): number {
  for (const s of timetable) if (wallMinute >= s.startMinute && wallMinute < s.endMinute) return s.occupancyFraction;
  return 0;
}

/** Median interval between consecutive readings of a day, minutes (Infinity with fewer than 2). */
export function medianStepMinutes(elapsed: ArrayLike<number>): number {
  const n = elapsed.length;
  if (n < 2) return Number.POSITIVE_INFINITY;
  const steps = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) steps[i - 1] = (elapsed[i] as number) - (elapsed[i - 1] as number);
  steps.sort();
  return steps[(steps.length - 1) >> 1] as number;
}

/** The statistics of one day. */
export function measureDay(day: MeasuredDay, ctx: DayContext): DayMeasure {
  const { timetable, thresholdsPpm, maxHoldMinutes } = ctx;
  const window = occupiedWindow(timetable);
  const windowMinutes = window.end - window.start;
  const n = day.co2Ppm.length;
  const nTh = thresholdsPpm.length;
  const minutesOver = new Array<number>(nTh).fill(0);
  const occupiedMinutesOver = new Array<number>(nTh).fill(0);
  const longest = new Array<number>(nTh).fill(0);
  const run = new Array<number>(nTh).fill(0);
  let minPpm = Number.POSITIVE_INFINITY;
  let maxPpm = Number.NEGATIVE_INFINITY;
  let nightMin = Number.POSITIVE_INFINITY;
  let windowSum = 0;
  let windowCount = 0;
  let windowFrom = 0;
  let covered = 0;
  let weighted = 0;
  const inWindow: number[] = [];

  for (let i = 0; i < n; i++) {
    const c = day.co2Ppm[i] as number;
    const wall = day.wallMin[i] as number;
    if (c < minPpm) minPpm = c;
    if (c > maxPpm) maxPpm = c;
    if (wall < NIGHT_END_MINUTE) {
      // Night minimum of the 30-minute running mean, so one noisy low reading does not set it.
      windowSum += c;
      windowCount++;
      while ((day.elapsedMin[windowFrom] as number) <= (day.elapsedMin[i] as number) - NIGHT_SMOOTHING_MINUTES) {
        windowSum -= day.co2Ppm[windowFrom] as number;
        windowCount--;
        windowFrom++;
      }
      const smoothed = windowSum / windowCount;
      if (
        (day.elapsedMin[i] as number) - (day.elapsedMin[windowFrom] as number) >= NIGHT_SMOOTHING_MINUTES / 2 &&
        smoothed < nightMin
      )
        nightMin = smoothed;
    }
    // The interval this reading stands for, in wall-clock minutes clipped to the occupied period.
    const next = i + 1 < n ? (day.elapsedMin[i + 1] as number) - (day.elapsedMin[i] as number) : maxHoldMinutes;
    const gap = next > maxHoldMinutes;
    const hold = gap ? 0 : next;
    const from = Math.max(wall, window.start);
    const to = Math.min(wall + hold, window.end);
    const dt = to > from ? to - from : 0;
    if (wall >= window.start && wall < window.end) inWindow.push(c);
    if (dt > 0) {
      covered += dt;
      weighted += c * dt;
      const occupancy = occupancyAt(timetable, from);
      for (let k = 0; k < nTh; k++) {
        if (c > (thresholdsPpm[k] as number)) {
          minutesOver[k] = (minutesOver[k] as number) + dt;
          occupiedMinutesOver[k] = (occupiedMinutesOver[k] as number) + dt * occupancy;
          run[k] = (run[k] as number) + dt;
          if ((run[k] as number) > (longest[k] as number)) longest[k] = run[k] as number;
        } else run[k] = 0;
      }
    }
    // A gap, or leaving the occupied period, ends every run.
    if (gap || wall + hold >= window.end) for (let k = 0; k < nTh; k++) run[k] = 0;
  }

  const coverage = windowMinutes > 0 ? Math.min(1, covered / windowMinutes) : 0;
  let occupied = false;
  if (day.weekday >= 1 && day.weekday <= 5 && inWindow.length > 0 && coverage >= 0.5) {
    inWindow.sort((a, b) => a - b);
    const p90 = inWindow[Math.floor(0.9 * (inWindow.length - 1))] as number;
    occupied = p90 - minPpm >= OCCUPIED_RISE_PPM;
  }
  return {
    date: day.date,
    season: day.season,
    readings: n,
    coverage,
    occupied,
    occupiedMeanPpm: covered > 0 ? weighted / covered : null,
    minPpm: n > 0 ? minPpm : 0,
    maxPpm: n > 0 ? maxPpm : 0,
    nightMinPpm: Number.isFinite(nightMin) ? nightMin : null,
    minutesOver,
    occupiedMinutesOver,
    longestRunMinutes: longest,
  };
}
