/**
 * Well-mixed single-zone CO2 mass balance, solved exactly piecewise over the school day.
 *   1000·V·dC/dt = Q·(C_o − C) + 10^6·G    ⇔   dC/dt = λ·(C_ss − C),  λ = 3.6·Q/V [h⁻¹]
 * Source: Batterman (2017) IJERPH 14(2):145 §2.1 (steady-state, build-up, decay and transient forms); BS 5925:1991
 * Appendix B (contaminant concentration in a ventilated space).
 * Units: C ppm, Q L/s, V m³, G L/s of CO2 at room conditions, time in minutes unless named otherwise.
 */
import type { CurvePoint, ThresholdExceedance } from './types';

/** Steady-state concentration C_ss = C_o + 10^6·G/Q, ppm (Q > 0 L/s). Batterman (2017) eq. for the steady state. */
export function steadyStateCo2Ppm(args: { outdoorCo2Ppm: number; generationLps: number; flowLps: number }): number {
  return args.outdoorCo2Ppm + (1e6 * args.generationLps) / args.flowLps;
}

/** Air-change rate λ = 3.6·Q/V, h⁻¹ (Q L/s, V m³). */
export function airChangeRatePerH(flowLps: number, volumeM3: number): number {
  return (3.6 * flowLps) / volumeM3;
}

/** Outdoor-air flow from an air-change rate: Q = λ·V/3.6, L/s. */
export function flowFromAirChangeLps(achPerH: number, volumeM3: number): number {
  return (achPerH * volumeM3) / 3.6;
}

/**
 * End and time-mean of one segment of constant G and Q (the exact solution of the linear ODE; Batterman 2017 §2.1):
 * C_end = C_ss + (C_0 − C_ss)·e^(−λT);  C_mean = C_ss + (C_0 − C_ss)·(1 − e^(−λT))/(λT).
 * λ h⁻¹ ≥ 0, T h > 0. With λ = 0 the linear limit C(t) = C_0 + rise·t is used (rise ppm/h).
 */
export function segmentEndAndMean(args: {
  startPpm: number;
  steadyPpm: number;
  achPerH: number;
  hours: number;
  risePpmPerH?: number;
}): {
  endPpm: number;
  meanPpm: number;
} {
  const { startPpm, steadyPpm, achPerH, hours } = args;
  if (achPerH <= 0) {
    const rise = args.risePpmPerH ?? 0;
    return { endPpm: startPpm + rise * hours, meanPpm: startPpm + (rise * hours) / 2 };
  }
  const x = achPerH * hours;
  const decay = Math.exp(-x);
  return {
    endPpm: steadyPpm + (startPpm - steadyPpm) * decay,
    meanPpm: steadyPpm + ((startPpm - steadyPpm) * (1 - decay)) / x,
  };
}

/**
 * Time for the trajectory to reach a threshold, t* = (1/λ)·ln[(C_ss − C_0)/(C_ss − C_th)], hours;
 * null when C_th is not strictly between C_0 and C_ss (inverting the exact solution).
 */
export function timeToThresholdH(args: {
  startPpm: number;
  steadyPpm: number;
  achPerH: number;
  thresholdPpm: number;
}): number | null {
  const { startPpm, steadyPpm, achPerH, thresholdPpm } = args;
  const between =
    (startPpm < thresholdPpm && thresholdPpm < steadyPpm) || (startPpm > thresholdPpm && thresholdPpm > steadyPpm);
  if (!between || achPerH <= 0) return null;
  return Math.log((steadyPpm - startPpm) / (steadyPpm - thresholdPpm)) / achPerH;
}

const SCRATCH_SIZE = 32;
const SCRATCH_RUN_START = new Float64Array(SCRATCH_SIZE);
const SCRATCH_LONGEST = new Float64Array(SCRATCH_SIZE);
const SCRATCH_OVER = new Float64Array(SCRATCH_SIZE);
const SCRATCH_OCC_OVER = new Float64Array(SCRATCH_SIZE);

/** One period of constant occupancy and ventilation, ready for the mass balance. */
export interface DaySegment {
  startMinute: number;
  endMinute: number;
  /** CO2 generation in the room, L/s at room conditions. */
  generationLps: number;
  /** Total outdoor-air flow, L/s (≥ 0). */
  flowLps: number;
  /** Share of design occupancy present, 0–1 (weights occupied minutes over). */
  occupancyFraction: number;
}

/** What one simulated day yields. */
export interface DayResult {
  meanPpm: number;
  peakPpm: number;
  endPpm: number;
  thresholds: ThresholdExceedance[];
}

/**
 * Simulate the day segment by segment with the exact solution (exact piecewise evaluation; no time-step error): carry C_end as the
 * next C_0, average C_mean weighted by duration over the whole timetable window, take the peak over segment
 * ends, and for each threshold track the longest uninterrupted run above it across segment boundaries.
 * `curve`, when given, receives a point every `curveStepMinutes` from the first segment's start to the last's end.
 */
export function simulateDay(args: {
  segments: readonly DaySegment[];
  volumeM3: number;
  outdoorCo2Ppm: number;
  startPpm: number;
  thresholdsPpm: readonly number[];
  curve?: CurvePoint[] | null;
  curveStepMinutes?: number;
}): DayResult {
  const { segments, volumeM3, outdoorCo2Ppm, thresholdsPpm } = args;
  const nTh = thresholdsPpm.length;
  // Reused scratch space: the engine is synchronous, so one set of buffers serves every call.
  const big = nTh > SCRATCH_SIZE;
  const runStart = big ? new Float64Array(nTh) : SCRATCH_RUN_START;
  const longest = big ? new Float64Array(nTh) : SCRATCH_LONGEST;
  const over = big ? new Float64Array(nTh) : SCRATCH_OVER;
  const occOver = big ? new Float64Array(nTh) : SCRATCH_OCC_OVER;
  for (let i = 0; i < nTh; i++) {
    runStart[i] = Number.NaN;
    longest[i] = 0;
    over[i] = 0;
    occOver[i] = 0;
  }
  const curve = args.curve ?? null;
  const step = args.curveStepMinutes ?? 5;
  let nextSample = segments.length > 0 ? (segments[0] as DaySegment).startMinute : 0;

  let c = args.startPpm;
  let peak = c;
  let weighted = 0;
  let totalMinutes = 0;
  // A day repeats a few (flow, length) pairs (lessons alike, breaks alike): e^(−λT) is taken once for each.
  let x1 = Number.NaN;
  let decay1 = 0;
  let x2 = Number.NaN;
  let decay2 = 0;

  for (const seg of segments) {
    const minutes = seg.endMinute - seg.startMinute;
    const hours = minutes / 60;
    const lambda = (3.6 * seg.flowLps) / volumeM3;
    const steady = seg.flowLps > 0 ? outdoorCo2Ppm + (1e6 * seg.generationLps) / seg.flowLps : Number.POSITIVE_INFINITY;
    const rise = (3600 * 1000 * seg.generationLps) / volumeM3; // ppm/h when Q = 0
    let endPpm: number;
    let meanPpm: number;
    if (lambda > 0) {
      const x = lambda * hours;
      let decay: number;
      if (x === x1) decay = decay1;
      else if (x === x2) decay = decay2;
      else {
        decay = Math.exp(-x);
        x2 = x1;
        decay2 = decay1;
        x1 = x;
        decay1 = decay;
      }
      endPpm = steady + (c - steady) * decay;
      meanPpm = steady + ((c - steady) * (1 - decay)) / x;
    } else {
      endPpm = c + rise * hours;
      meanPpm = c + (rise * hours) / 2;
    }

    if (curve) {
      while (
        nextSample <= seg.endMinute + 1e-9 &&
        (nextSample < seg.endMinute || seg === segments[segments.length - 1])
      ) {
        const tH = (nextSample - seg.startMinute) / 60;
        const value = lambda > 0 ? steady + (c - steady) * Math.exp(-lambda * tH) : c + rise * tH;
        curve.push({ minute: nextSample, co2Ppm: value });
        nextSample += step;
      }
    }

    for (let i = 0; i < nTh; i++) {
      const th = thresholdsPpm[i] as number;
      // Within a segment the trajectory is monotone, so "above" is one interval [a, b] of the segment.
      let aboveFrom = -1;
      let aboveTo = -1;
      if (c > th) {
        aboveFrom = 0;
        if (endPpm > th) aboveTo = minutes;
        else aboveTo = crossingMinutes(c, steady, lambda, rise, th, minutes);
      } else if (endPpm > th) {
        aboveFrom = crossingMinutes(c, steady, lambda, rise, th, minutes);
        aboveTo = minutes;
      }
      if (aboveFrom < 0) {
        runStart[i] = Number.NaN;
        continue;
      }
      const duration = aboveTo - aboveFrom;
      over[i] = (over[i] as number) + duration;
      occOver[i] = (occOver[i] as number) + duration * seg.occupancyFraction;
      let start = runStart[i] as number;
      if (aboveFrom > 0 || Number.isNaN(start)) start = seg.startMinute + aboveFrom;
      const runLength = seg.startMinute + aboveTo - start;
      if (runLength > (longest[i] as number)) longest[i] = runLength;
      runStart[i] = aboveTo < minutes ? Number.NaN : start;
    }

    weighted += meanPpm * minutes;
    totalMinutes += minutes;
    c = endPpm;
    if (c > peak) peak = c;
  }

  const thresholds: ThresholdExceedance[] = new Array<ThresholdExceedance>(nTh);
  for (let i = 0; i < nTh; i++) {
    thresholds[i] = {
      thresholdPpm: thresholdsPpm[i] as number,
      longestRunMinutes: longest[i] as number,
      minutesOver: over[i] as number,
      occupiedMinutesOver: occOver[i] as number,
    };
  }
  return { meanPpm: totalMinutes > 0 ? weighted / totalMinutes : c, peakPpm: peak, endPpm: c, thresholds };
}

/** Minutes into a segment at which C crosses `th` (caller guarantees a crossing within the segment). */
function crossingMinutes(
  c0: number,
  steady: number,
  lambda: number,
  rise: number,
  th: number,
  minutes: number,
): number {
  let t: number;
  if (lambda > 0) t = (60 * Math.log((steady - c0) / (steady - th))) / lambda;
  else t = rise > 0 ? (60 * (th - c0)) / rise : minutes;
  if (!(t >= 0)) return 0;
  return Math.min(t, minutes);
}
