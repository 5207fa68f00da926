import { describe, expect, it } from 'vitest';
import {
  airChangeRatePerH,
  segmentEndAndMean,
  simulateDay,
  steadyStateCo2Ppm,
  timeToThresholdH,
} from '~/lib/engine/co2-mass-balance';
import { decayAchPerH, decayedPpm, plateauFlowLps } from '~/lib/engine/calibration';
import { EXAMPLE_ONE, exampleOneSegments } from './example-one';
import caseA from './fixtures/example1-case-a-segments.json';

const day = (flowLps: number, thresholdsPpm: number[] = [1500, 2000]) =>
  simulateDay({
    segments: exampleOneSegments(flowLps),
    volumeM3: EXAMPLE_ONE.volumeM3,
    outdoorCo2Ppm: EXAMPLE_ONE.outdoorCo2Ppm,
    startPpm: EXAMPLE_ONE.outdoorCo2Ppm,
    thresholdsPpm,
  });

describe('steady state and air-change rate', () => {
  it('gives 1376.90 ppm for G 0.148319 L/s and Q 155 L/s (Batterman 2017 §2.1 steady state, by hand)', () => {
    expect(steadyStateCo2Ppm({ outdoorCo2Ppm: 420, generationLps: 0.148319, flowLps: 155 })).toBeCloseTo(1376.9, 1); // ±0.05
  });

  it('gives 3.32143 h⁻¹ for 155 L/s in 168 m³ (identity λ = 3.6Q/V)', () => {
    expect(Math.abs(airChangeRatePerH(155, 168) - 3.32143)).toBeLessThanOrEqual(1e-5);
  });

  it('gives C_end 1342.4 and C_mean 1099.2 ppm over one hour from 420 ppm (Batterman 2017 §2.1 exact solution, by hand)', () => {
    const r = segmentEndAndMean({ startPpm: 420, steadyPpm: 1376.9, achPerH: 3.32143, hours: 1 });
    expect(Math.abs(r.endPpm - 1342.4)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(r.meanPpm - 1099.2)).toBeLessThanOrEqual(0.1);
  });

  it('uses the linear limit when there is no outdoor air (the limit of the exact solution as Q → 0)', () => {
    // Hand derivation: rise = 10^6·G·3600/(1000·V) = 10^6·0.1·3600/(1000·100) = 3600 ppm/h; one hour from 420 → 4020, mean 2220.
    const r = segmentEndAndMean({
      startPpm: 420,
      steadyPpm: Number.POSITIVE_INFINITY,
      achPerH: 0,
      hours: 1,
      risePpmPerH: 3600,
    });
    expect(r.endPpm).toBeCloseTo(4020, 9);
    expect(r.meanPpm).toBeCloseTo(2220, 9);
  });
});

describe('worked example 1, case A, segment by segment', () => {
  const result = simulateDay({
    segments: exampleOneSegments(155),
    volumeM3: 168,
    outdoorCo2Ppm: 420,
    startPpm: 420,
    thresholdsPpm: [1500],
    curve: [],
  });
  const curve: { minute: number; co2Ppm: number }[] = [];
  simulateDay({
    segments: exampleOneSegments(155),
    volumeM3: 168,
    outdoorCo2Ppm: 420,
    startPpm: 420,
    thresholdsPpm: [],
    curve,
  });

  for (const row of caseA.rows) {
    it(`${row.segment} ends at ${row.cEnd} ppm with mean ${row.cMean} ppm (${caseA.source}; ±${caseA.tolerancePpm})`, () => {
      const steady = row.occupied
        ? steadyStateCo2Ppm({ outdoorCo2Ppm: 420, generationLps: 0.148319, flowLps: 155 })
        : 420;
      const seg = segmentEndAndMean({
        startPpm: row.c0,
        steadyPpm: steady,
        achPerH: airChangeRatePerH(155, 168),
        hours: (row.endMinute - row.startMinute) / 60,
      });
      expect(Math.abs(seg.endPpm - row.cEnd)).toBeLessThanOrEqual(caseA.tolerancePpm + 0.05);
      expect(Math.abs(seg.meanPpm - row.cMean)).toBeLessThanOrEqual(caseA.tolerancePpm + 0.05);
      // the carried-over day curve passes through the tabulated segment end
      const point = curve.find((p) => p.minute === row.endMinute);
      expect(point).toBeDefined();
      expect(Math.abs((point?.co2Ppm ?? 0) - row.cEnd)).toBeLessThanOrEqual(caseA.tolerancePpm);
    });
  }

  it('has peak equal to the highest tabulated segment end, 1375.7 ppm (worked example 1, docs/sources.md)', () => {
    expect(Math.abs(result.peakPpm - 1375.7)).toBeLessThanOrEqual(0.1);
  });

  it('samples the curve every 5 minutes from 09:00 to 15:15 inclusive (76 points)', () => {
    // (915 − 540)/5 + 1 = 76
    expect(curve).toHaveLength(76);
    expect(curve[0]).toEqual({ minute: 540, co2Ppm: 420 });
    expect(curve[75]?.minute).toBe(915);
  });
});

describe('daily occupied means of worked example 1', () => {
  it('case A, Q 155 L/s: 1139.5 ppm (worked example 1, ±0.5)', () => {
    expect(Math.abs(day(155).meanPpm - 1139.5)).toBeLessThanOrEqual(0.5);
  });
  it('case B, Q 40 L/s: 2773.6 ppm (worked example 1, ±0.5)', () => {
    expect(Math.abs(day(40).meanPpm - 2773.6)).toBeLessThanOrEqual(0.5);
  });
  it('case C, Q 248 L/s: 880.4 ppm (worked example 1, ±0.5)', () => {
    expect(Math.abs(day(248).meanPpm - 880.4)).toBeLessThanOrEqual(0.5);
  });
});

describe('threshold crossings and runs', () => {
  it('reaches 2000 ppm after 38.87 min from 420 ppm with C_ss 4127.97 and λ 0.857143 h⁻¹ (Batterman 2017 §2.1 build-up solved for t, by hand)', () => {
    const t = timeToThresholdH({ startPpm: 420, steadyPpm: 4127.97, achPerH: 0.857143, thresholdPpm: 2000 });
    expect(t).not.toBeNull();
    expect(Math.abs((t ?? 0) * 60 - 38.87)).toBeLessThanOrEqual(0.05);
  });

  it('returns no crossing when the threshold is not between start and steady state (Batterman 2017 §2.1)', () => {
    expect(timeToThresholdH({ startPpm: 420, steadyPpm: 1376.9, achPerH: 3.3, thresholdPpm: 1500 })).toBeNull();
  });

  it('case B stays above 2000 ppm for 205.0 min in a row, 09:38.9–13:03.9, across the break (worked example 1, ±0.2 min)', () => {
    const entry = day(40).thresholds.find((t) => t.thresholdPpm === 2000);
    expect(Math.abs((entry?.longestRunMinutes ?? 0) - 205.0)).toBeLessThanOrEqual(0.2);
  });

  it('case A never exceeds 1500 ppm: longest run 0 min (worked example 1, exact)', () => {
    const entry = day(155).thresholds.find((t) => t.thresholdPpm === 1500);
    expect(entry?.longestRunMinutes).toBe(0);
    expect(entry?.minutesOver).toBe(0);
  });

  it('counts occupied minutes over only while pupils are in (case B above 2000 ppm)', () => {
    // Hand derivation from worked example 1, case B: the run 09:38.9–13:03.9 covers L1 from 38.9 min (21.1 min), L2 (60), the
    // break (15, empty), L3 (60) and 48.9 min of lunch (empty): occupied = 21.1 + 60 + 60 = 141.1 min before lunch.
    const entry = day(40).thresholds.find((t) => t.thresholdPpm === 2000);
    expect(entry).toBeDefined();
    expect((entry?.minutesOver ?? 0) - (entry?.occupiedMinutesOver ?? 0)).toBeGreaterThanOrEqual(15 + 48.9 - 0.2);
  });
});

describe('ventilation from logged CO2', () => {
  it('two-point decay 1650→900 ppm in 0.75 h gives λ 1.2546 h⁻¹ and Q 58.55 L/s in 168 m³ (ASTM E741 / Batterman 2017, by hand)', () => {
    const lambda = decayAchPerH({ startPpm: 1650, endPpm: 900, outdoorCo2Ppm: 420, elapsedHours: 0.75 });
    expect(Math.abs(lambda - 1.2546)).toBeLessThanOrEqual(0.0005);
    expect(Math.abs((lambda * 168) / 3.6 - 58.55)).toBeLessThanOrEqual(0.05);
  });

  it('round-trips 1800 ppm at λ 1.0 h⁻¹ to 927.67 ppm after one hour and back to λ 1.000 (ASTM E741 decay, by hand)', () => {
    const c = decayedPpm({ startPpm: 1800, outdoorCo2Ppm: 420, achPerH: 1, hours: 1 });
    expect(Math.abs(c - 927.67)).toBeLessThanOrEqual(0.01);
    expect(decayAchPerH({ startPpm: 1800, endPpm: c, outdoorCo2Ppm: 420, elapsedHours: 1 })).toBeCloseTo(1, 9);
  });

  it('plateau 1500 ppm with G 0.148319 L/s gives 137.33 L/s (Batterman 2017 steady-state method, by hand)', () => {
    expect(
      Math.abs(plateauFlowLps({ generationLps: 0.148319, plateauPpm: 1500, outdoorCo2Ppm: 420 }) - 137.33),
    ).toBeLessThanOrEqual(0.01);
  });
});
