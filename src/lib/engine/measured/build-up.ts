/**
 * The build-up method with known occupants: during a lesson CO2 rises towards C_ss = C_o + A/λ along the exact
 * mass-balance solution C(t) = C_ss + (C_0 − C_ss)·e^(−λt), where A = 3.6·10⁶·G/V is the rise rate the
 * occupants' CO2 generation G (L/s) gives a room of V m³ (ppm/h). With G from the register's occupancy and
 * Persily & de Jonge (2017) Table 4, λ and C_0 are fitted by nonlinear least squares (Levenberg–Marquardt,
 * npm ml-levenberg-marquardt, analytical Jacobian), started from the integral mass balance
 * C(t) − C(0) − A·t = −λ·∫(C − C_o)dt, which is linear in λ.
 * Method: Batterman (2017) IJERPH 14(2):145, build-up and transient mass-balance methods. The rate assumes the
 * register's pupils were in: with fewer, it overstates the air change (Batterman notes ~50 % differences).
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import type { TimetableSegment } from '../types';
import { summariseRates } from './statistics';
import type { AirChangeEstimate, Confidence, MeasuredDay } from './types';

export const BUILD_UP_NOTE = {
  method:
    'Build-up method: exact mass-balance rise during lessons with the register’s occupants’ CO2 generation, fitted by Levenberg–Marquardt',
  source: 'Batterman (2017) IJERPH 14(2):145; generation from Persily & de Jonge (2017) Indoor Air 27(5) Table 4',
};

/** Event rules (common practice): skip the first 5 minutes of a lesson (arrivals), need 6 readings, no gaps. */
export const BUILD_UP_RULES = { skipStartMinutes: 5, minPoints: 6, maxRmsPpm: 150, minAch: 0.05, maxAch: 30 } as const;

/** CO2 rise rate from generation into a well-mixed room, A = 3.6·10⁶·G/V, ppm/h (G L/s, V m³). */
export function riseRatePpmPerH(generationLps: number, volumeM3: number): number {
  return (3.6e6 * generationLps) / volumeM3;
}

/** A fitted build-up. */
export interface BuildUpFit {
  achPerH: number;
  startPpm: number;
  /** Root-mean-square residual, ppm. */
  rmsPpm: number;
  points: number;
}

/**
 * Integral-method estimate of λ for a build-up, h⁻¹: least squares through the origin of
 * y = C(t) − C(0) − A·t on x = −∫(C − C_o)dt (trapezoids). Null when it cannot be formed.
 */
export function integralBuildUpAch(
  hours: readonly number[],
  ppm: readonly number[],
  outdoorPpm: number,
  risePpmPerH: number,
): number | null {
  let integral = 0;
  let sxy = 0;
  let sxx = 0;
  for (let i = 1; i < hours.length; i++) {
    const dt = (hours[i] as number) - (hours[i - 1] as number);
    integral += 0.5 * dt * ((ppm[i] as number) + (ppm[i - 1] as number) - 2 * outdoorPpm);
    const t = (hours[i] as number) - (hours[0] as number);
    const y = (ppm[i] as number) - (ppm[0] as number) - risePpmPerH * t;
    sxy += -integral * y;
    sxx += integral * integral;
  }
  return sxx > 0 ? sxy / sxx : null;
}

/**
 * Fits λ (h⁻¹) and C_0 (ppm) to one build-up with a known rise rate A (ppm/h). Hours from the first reading.
 * Null when the fit fails or lands outside 0.05–30 h⁻¹.
 */
export function fitBuildUp(
  hours: readonly number[],
  ppm: readonly number[],
  outdoorPpm: number,
  risePpmPerH: number,
): BuildUpFit | null {
  const R = BUILD_UP_RULES;
  if (hours.length < 3 || !(risePpmPerH > 0)) return null;
  const t0 = hours[0] as number;
  const x = hours.map((h) => h - t0);
  const guess = integralBuildUpAch(hours, ppm, outdoorPpm, risePpmPerH);
  const start = guess !== null && guess > R.minAch && guess < R.maxAch ? guess : 2;
  const model = ([lambda, c0]: number[]) => {
    const steady = outdoorPpm + risePpmPerH / (lambda as number);
    return (t: number) => steady + ((c0 as number) - steady) * Math.exp(-(lambda as number) * t);
  };
  const jacobian = ([lambda, c0]: number[]) => {
    const l = lambda as number;
    const steady = outdoorPpm + risePpmPerH / l;
    const dSteady = -risePpmPerH / (l * l);
    return (t: number) => {
      const e = Math.exp(-l * t);
      return [dSteady * (1 - e) - t * ((c0 as number) - steady) * e, e];
    };
  };
  let result: { parameterValues: number[] };
  try {
    // Started from the integral estimate, two parameters with the analytical Jacobian settle within a few
    // iterations; the library stops only on an absolute error, so the iterations are capped instead.
    result = levenbergMarquardt({ x, y: ppm }, model, {
      initialValues: [start, ppm[0] as number],
      jacobianFunction: jacobian,
      minValues: [R.minAch, 0],
      maxValues: [R.maxAch, 20_000],
      maxIterations: 15,
      errorTolerance: 1e-6,
    });
  } catch {
    return null;
  }
  const [lambda, c0] = result.parameterValues as [number, number];
  if (!(lambda > R.minAch && lambda < R.maxAch) || !Number.isFinite(c0)) return null;
  const f = model([lambda, c0]);
  let ss = 0;
  for (let i = 0; i < x.length; i++) ss += ((ppm[i] as number) - f(x[i] as number)) ** 2;
  return { achPerH: lambda, startPpm: c0, rmsPpm: Math.sqrt(ss / x.length), points: x.length };
}

/** Readings of each lesson of a day that can be fitted: in the lesson after its first minutes, without gaps. */
export function lessonWindows(args: {
  day: MeasuredDay;
  timetable: readonly TimetableSegment[];
  maxHoldMinutes: number;
}): { hours: number[]; ppm: number[]; occupancyFraction: number }[] {
  const { day, timetable, maxHoldMinutes } = args;
  const out: { hours: number[]; ppm: number[]; occupancyFraction: number }[] = [];
  const n = day.co2Ppm.length;
  for (const seg of timetable) {
    if (seg.kind !== 'lesson' || seg.occupancyFraction <= 0) continue;
    const hours: number[] = [];
    const ppm: number[] = [];
    let broken = false;
    for (let i = 0; i < n; i++) {
      const w = day.wallMin[i] as number;
      if (w < seg.startMinute + BUILD_UP_RULES.skipStartMinutes || w > seg.endMinute) continue;
      if (
        hours.length > 0 &&
        (day.elapsedMin[i] as number) / 60 - (hours[hours.length - 1] as number) > maxHoldMinutes / 60
      ) {
        broken = true;
        break;
      }
      hours.push((day.elapsedMin[i] as number) / 60);
      ppm.push(day.co2Ppm[i] as number);
    }
    if (!broken && hours.length >= BUILD_UP_RULES.minPoints)
      out.push({ hours, ppm, occupancyFraction: seg.occupancyFraction });
  }
  return out;
}

/** Confidence of a season's build-up estimate [CP, an Airtally rule]. */
export function buildUpConfidence(events: number, medianRmsPpm: number, relativeIqr: number): Confidence {
  if (events === 0) return 'none';
  if (events >= 15 && medianRmsPpm <= 40 && relativeIqr <= 0.5) return 'high';
  if (events >= 5 && medianRmsPpm <= 80 && relativeIqr <= 1) return 'medium';
  return 'low';
}

/** The season's estimate from its build-ups: the median rate, its spread, and a confidence. */
export function summariseBuildUps(
  fits: readonly BuildUpFit[],
  rejected: number,
  volumeM3: number,
): AirChangeEstimate | null {
  return summariseRates({
    rates: fits.map((e) => e.achPerH),
    qualities: fits.map((e) => e.rmsPpm),
    rejected,
    volumeM3,
    confidence: buildUpConfidence,
    note: BUILD_UP_NOTE,
  });
}
