/**
 * The closed-form piecewise CO2 solution against a general-purpose ODE integrator (odex: Gragg–Bulirsch–Stoer,
 * a port of Hairer & Wanner's ODEX). The integrator knows only the differential equation
 * 1000·V·dC/dt = Q·(C_o − C) + 10^6·G and restarts at each timetable boundary.
 */
import fc from 'fast-check';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { simulateDay, type DaySegment } from '~/lib/engine/co2-mass-balance';
import { EXAMPLE_ONE, exampleOneSegments } from './example-one';

/** The slice of odex's API used here. Loaded with require so the type checker does not compile odex's own
 *  TypeScript source (which predates our strictest settings). */
interface OdexSolver {
  absoluteTolerance: number;
  relativeTolerance: number;
  denseOutput: boolean;
  grid(dt: number, out: (x: number, y: number[]) => void): unknown;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], x1: number, out?: unknown): { y: number[] };
}
const { Solver } = createRequire(import.meta.url)('odex') as { Solver: new (n: number) => OdexSolver };

interface OdeDay {
  meanPpm: number;
  peakPpm: number;
  ends: number[];
  /** Longest run above each threshold, minutes, from a 0.01-minute dense-output grid. */
  longestRun: (thresholdPpm: number) => number;
}

/** Integrate [C, ∫C dt] over each segment in minutes; sample densely for threshold runs. */
function integrateDay(segments: readonly DaySegment[], volumeM3: number, outdoorPpm: number, startPpm: number): OdeDay {
  const solver = new Solver(2);
  solver.absoluteTolerance = 1e-10;
  solver.relativeTolerance = 1e-10;
  solver.denseOutput = true;
  let c = startPpm;
  let integral = 0;
  let minutes = 0;
  let peak = c;
  const ends: number[] = [];
  const samples: { minute: number; ppm: number }[] = [];
  for (const seg of segments) {
    const duration = seg.endMinute - seg.startMinute;
    // dC/dt per minute = 60 · (Q·(C_o − C) + 10^6·G) / (1000·V)
    const f = (_t: number, y: number[]) => {
      const ci = y[0] as number;
      const dc = (60 * (seg.flowLps * (outdoorPpm - ci) + 1e6 * seg.generationLps)) / (1000 * volumeM3);
      return [dc, ci];
    };
    const result = solver.solve(
      f,
      0,
      [c, 0],
      duration,
      solver.grid(0.01, (t: number, y: number[]) => {
        samples.push({ minute: seg.startMinute + t, ppm: y[0] as number });
      }),
    );
    c = result.y[0] as number;
    integral += result.y[1] as number;
    minutes += duration;
    peak = Math.max(peak, c);
    ends.push(c);
  }
  return {
    meanPpm: integral / minutes,
    peakPpm: peak,
    ends,
    longestRun: (th: number) => {
      let best = 0;
      let start: number | null = null;
      for (const s of samples) {
        if (s.ppm > th) {
          if (start === null) start = s.minute;
          best = Math.max(best, s.minute - start);
        } else start = null;
      }
      return best;
    },
  };
}

describe('closed-form CO2 agrees with numerical integration', () => {
  for (const flow of [40, 155, 248]) {
    it(`worked example 1 with Q ${flow} L/s: segment ends, mean and peak within 0.01 ppm; runs within 0.05 min`, () => {
      const segments = exampleOneSegments(flow);
      const exact = simulateDay({
        segments,
        volumeM3: EXAMPLE_ONE.volumeM3,
        outdoorCo2Ppm: 420,
        startPpm: 420,
        thresholdsPpm: [1000, 1500, 2000],
      });
      const ode = integrateDay(segments, EXAMPLE_ONE.volumeM3, 420, 420);
      expect(Math.abs(exact.meanPpm - ode.meanPpm)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(exact.peakPpm - ode.peakPpm)).toBeLessThanOrEqual(0.01);
      expect(Math.abs(exact.endPpm - (ode.ends[ode.ends.length - 1] as number))).toBeLessThanOrEqual(0.01);
      for (const t of exact.thresholds) {
        expect(Math.abs(t.longestRunMinutes - ode.longestRun(t.thresholdPpm))).toBeLessThanOrEqual(0.05);
      }
    });
  }

  it('for random timetables, occupancies and flows (fast-check)', () => {
    const segmentArb = fc.record({
      minutes: fc.integer({ min: 5, max: 90 }),
      generationLps: fc.double({ min: 0, max: 0.4, noNaN: true }),
      flowLps: fc.double({ min: 1, max: 600, noNaN: true }),
    });
    fc.assert(
      fc.property(
        fc.array(segmentArb, { minLength: 1, maxLength: 8 }),
        fc.double({ min: 30, max: 1500, noNaN: true }),
        fc.double({ min: 380, max: 3000, noNaN: true }),
        (raw, volumeM3, startPpm) => {
          let t = 540;
          const segments: DaySegment[] = raw.map((r) => {
            const s = {
              startMinute: t,
              endMinute: t + r.minutes,
              generationLps: r.generationLps,
              flowLps: r.flowLps,
              occupancyFraction: r.generationLps > 0 ? 1 : 0,
            };
            t += r.minutes;
            return s;
          });
          const exact = simulateDay({ segments, volumeM3, outdoorCo2Ppm: 420, startPpm, thresholdsPpm: [] });
          const ode = integrateDay(segments, volumeM3, 420, startPpm);
          const scale = Math.max(1, exact.peakPpm / 1000);
          expect(Math.abs(exact.meanPpm - ode.meanPpm)).toBeLessThanOrEqual(0.01 * scale);
          expect(Math.abs(exact.endPpm - (ode.ends[ode.ends.length - 1] as number))).toBeLessThanOrEqual(0.01 * scale);
        },
      ),
      { numRuns: 40, seed: 20261201 },
    );
  });
});
