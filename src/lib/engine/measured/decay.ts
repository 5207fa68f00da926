/**
 * The decay (tracer-gas dilution) method: once the room is empty (G = 0) CO2 falls exponentially towards
 * outdoor air, C(t) = C_o + (C_0 − C_o)·e^(−λt), so ln(C − C_o) falls linearly with slope −λ. The rate is the
 * least-squares slope of ln(C − C_o) on time. ASTM E741 (concentration-decay test), as applied to occupant
 * CO2 in school classrooms by Batterman (2017) IJERPH 14(2):145.
 * Event rules (domain pitfalls, common practice): start 10 minutes after the peak (people leaving, mixing),
 * need at least 500 ppm above outdoor at the start, stop below 200 ppm above outdoor (noise-dominated), when
 * CO2 rises again (people back) or at a gap; at least 4 readings over at least 15 minutes.
 */
import type { TimetableSegment } from '../types';
import { summariseRates } from './statistics';
import type { AirChangeEstimate, Confidence, MeasuredDay } from './types';

export const DECAY_NOTE = {
  method: 'Decay method: least-squares slope of ln(C − C_o) against time after pupils leave',
  source: 'ASTM E741 concentration decay, applied to occupant CO2 in classrooms by Batterman (2017) IJERPH 14(2):145',
};

/** Event rules, ppm and minutes (common practice, see the module comment). */
export const DECAY_RULES = {
  skipAfterPeakMinutes: 10,
  minStartExcessPpm: 500,
  minExcessPpm: 200,
  riseStopsPpm: 50,
  minPoints: 4,
  minSpanMinutes: 15,
  peakSearchMinutes: 20,
  afterSchoolMaxMinutes: 240,
  minR2: 0.5,
} as const;

/** A least-squares decay fit. */
export interface DecayFit {
  achPerH: number;
  /** Coefficient of determination of the log-linear regression. */
  r2: number;
  points: number;
}

/**
 * Air-change rate from readings of an empty room (hours from any origin, ppm), fitted towards outdoor air.
 * Two points give the two-point form λ = ln[(C1 − C_o)/(C2 − C_o)]/(t2 − t1). Null when any reading is at or
 * below outdoor air or there are fewer than two.
 */
export function fitDecayLogLinear(
  hours: ArrayLike<number>,
  ppm: ArrayLike<number>,
  outdoorPpm: number,
): DecayFit | null {
  const n = hours.length;
  if (n < 2) return null;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i++) {
    const excess = (ppm[i] as number) - outdoorPpm;
    if (!(excess > 0)) return null;
    sx += hours[i] as number;
    sy += Math.log(excess);
  }
  const mx = sx / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = (hours[i] as number) - mx;
    const dy = Math.log((ppm[i] as number) - outdoorPpm) - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (sxx === 0) return null;
  const slope = sxy / sxx;
  const r2 = syy === 0 ? 1 : (sxy * sxy) / (sxx * syy);
  return { achPerH: -slope, r2, points: n };
}

/** One decay found in a day's readings. */
export interface DecayEvent extends DecayFit {
  kind: 'in_day' | 'after_school';
  startWallMinute: number;
}

/**
 * Decays of one day: after each lesson that is followed by an empty period (break, lunch) or ends the day.
 * `maxHoldMinutes` is the longest step between readings that is not a gap.
 */
export function findDecays(args: {
  day: MeasuredDay;
  timetable: readonly TimetableSegment[];
  outdoorPpm: number;
  maxHoldMinutes: number;
}): { events: DecayEvent[]; rejected: number } {
  const { day, timetable, outdoorPpm, maxHoldMinutes } = args;
  const R = DECAY_RULES;
  const events: DecayEvent[] = [];
  let rejected = 0;
  const n = day.co2Ppm.length;
  for (let k = 0; k < timetable.length; k++) {
    const seg = timetable[k] as TimetableSegment;
    const next = timetable[k + 1];
    if (seg.occupancyFraction <= 0) continue;
    const last = next === undefined;
    if (!last && (next as TimetableSegment).occupancyFraction > 0) continue;
    // The empty period ends when the next occupied segment starts.
    let endWall = Number.POSITIVE_INFINITY;
    if (!last) {
      for (let j = k + 1; j < timetable.length; j++) {
        const s = timetable[j] as TimetableSegment;
        if (s.occupancyFraction > 0) {
          endWall = s.startMinute;
          break;
        }
      }
    }
    // An empty period too short for a decay after the skipped minutes (a 15-minute break) is not an event.
    if (endWall - seg.endMinute < R.skipAfterPeakMinutes + R.minSpanMinutes) continue;
    // The peak near the scheduled end of the lesson.
    let peakAt = -1;
    for (let i = 0; i < n; i++) {
      const w = day.wallMin[i] as number;
      if (w < seg.endMinute - R.peakSearchMinutes || w > seg.endMinute + R.peakSearchMinutes) continue;
      if (peakAt < 0 || (day.co2Ppm[i] as number) > (day.co2Ppm[peakAt] as number)) peakAt = i;
    }
    if (peakAt < 0) continue;
    const startElapsed = (day.elapsedMin[peakAt] as number) + R.skipAfterPeakMinutes;
    const stopElapsed = last ? (day.elapsedMin[peakAt] as number) + R.afterSchoolMaxMinutes : Number.POSITIVE_INFINITY;
    const hours: number[] = [];
    const ppm: number[] = [];
    let runningMin = Number.POSITIVE_INFINITY;
    for (let i = peakAt + 1; i < n; i++) {
      const t = day.elapsedMin[i] as number;
      if (t - (day.elapsedMin[i - 1] as number) > maxHoldMinutes) break;
      if (t < startElapsed) continue;
      if (t > stopElapsed || (day.wallMin[i] as number) >= endWall) break;
      const c = day.co2Ppm[i] as number;
      if (c > runningMin + R.riseStopsPpm) break;
      if (c - outdoorPpm < R.minExcessPpm) break;
      if (c < runningMin) runningMin = c;
      hours.push(t / 60);
      ppm.push(c);
    }
    if (hours.length === 0) continue;
    const span = ((hours[hours.length - 1] as number) - (hours[0] as number)) * 60;
    if (
      (ppm[0] as number) - outdoorPpm < R.minStartExcessPpm ||
      hours.length < R.minPoints ||
      span < R.minSpanMinutes
    ) {
      rejected++;
      continue;
    }
    const fit = fitDecayLogLinear(hours, ppm, outdoorPpm);
    if (!fit || !(fit.achPerH > 0) || fit.r2 < R.minR2) {
      rejected++;
      continue;
    }
    events.push({ ...fit, kind: last ? 'after_school' : 'in_day', startWallMinute: day.wallMin[peakAt] as number });
  }
  return { events, rejected };
}

/** Confidence of a season's decay estimate [CP, an Airtally rule]: how many decays, how clean, how consistent. */
export function decayConfidence(events: number, medianR2: number, relativeIqr: number): Confidence {
  if (events === 0) return 'none';
  if (events >= 8 && medianR2 >= 0.9 && relativeIqr <= 0.5) return 'high';
  if (events >= 6 && medianR2 >= 0.8 && relativeIqr <= 1) return 'medium';
  return 'low';
}

/** The season's estimate from its decays: the median rate, its spread, and a confidence. */
export function summariseDecays(
  events: readonly DecayFit[],
  rejected: number,
  volumeM3: number,
): AirChangeEstimate | null {
  return summariseRates({
    rates: events.map((e) => e.achPerH),
    qualities: events.map((e) => e.r2),
    rejected,
    volumeM3,
    confidence: decayConfidence,
    note: DECAY_NOTE,
  });
}
