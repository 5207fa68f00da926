/**
 * The measured-CO2 methods against logs generated from the mass-balance ODE with known air-change rates,
 * occupancy and noise (synthetic-log.ts), and against the decay method's worked numbers.
 */
import { describe, expect, it } from 'vitest';
import { decayedPpm } from '~/lib/engine/calibration';
import { analyseRoom, fitDecayLogLinear, type MeasuredSeason } from '~/lib/engine/measured';
import type { AppliedCriterion, TimetableSegment } from '~/lib/engine/types';
import { EXAMPLE_ONE } from '../engine/example-one';
import { syntheticDays, type SyntheticRoom } from './synthetic-log';

const TIMETABLE: TimetableSegment[] = EXAMPLE_ONE.periods.map((p) => ({
  label: p.label,
  kind: p.occupied ? 'lesson' : p.label === 'lunch' ? 'lunch' : 'break',
  startMinute: p.start,
  endMinute: p.end,
  occupancyFraction: p.occupied ? 1 : 0,
}));

/** BB101 (2018) new build, natural ventilation: mean < 1500 ppm, not above 2000 ppm for more than 20 minutes (secondary source). */
const NATURAL: AppliedCriterion = {
  packId: 'bb101_2018_new_natural',
  packName: 'BB101 new natural',
  meanLimitPpm: 1500,
  maxLimitPpm: 2000,
  maxMinutesCap: 20,
  riskThresholdPpm: 1500,
  flagged: false,
  note: null,
};

function room(overrides: Partial<SyntheticRoom> = {}): SyntheticRoom {
  return {
    volumeM3: EXAMPLE_ONE.volumeM3,
    outdoorPpm: 420,
    generationLps: EXAMPLE_ONE.generationLps,
    lessonAch: 2,
    emptyAch: 3,
    nightAch: 0.4,
    timetable: TIMETABLE,
    noisePpm: 15,
    stepMinutes: 5,
    season: 'winter',
    seed: 20261204,
    ...overrides,
  };
}

function analyse(r: SyntheticRoom, days = 28): MeasuredSeason {
  const result = analyseRoom({
    days: syntheticDays(r, days),
    timetable: TIMETABLE,
    volumeM3: r.volumeM3,
    generationLpsBySeason: { winter: r.generationLps, mid: r.generationLps, summer: r.generationLps },
    criterion: NATURAL,
    assumedOutdoorPpm: 400,
  });
  return result.room.seasons[r.season]!;
}

describe('decay method (ASTM E741 concentration decay, as applied to classroom CO2 by Batterman 2017)', () => {
  it('gives 1.2546 h⁻¹ and 58.55 l/s for 1650 → 900 ppm over 0.75 h towards 420 ppm in a 168 m³ room', () => {
    // Two-point form λ = ln[(C1 − C_o)/(C2 − C_o)]/Δt: ln(1230/480)/0.75 = 1.2546 h⁻¹ (ASTM E741 / Batterman 2017).
    const fit = fitDecayLogLinear([0, 0.75], [1650, 900], 420)!;
    expect(fit.achPerH).toBeCloseTo(1.2546, 3);
    expect((fit.achPerH * 168) / 3.6).toBeCloseTo(58.55, 1);
  });

  it('recovers 1.000 h⁻¹ from the round trip 1800 ppm → 927.67 ppm after one hour towards 420 ppm', () => {
    // C(1 h) = 420 + 1380·e^(−1) = 927.67 ppm (exact solution, Batterman 2017 eq. for G = 0).
    const fit = fitDecayLogLinear([0, 0.25, 0.5, 0.75, 1], [1800, 1494.7, 1257.0, 1071.8, 927.67], 420)!;
    expect(fit.achPerH).toBeCloseTo(1.0, 3);
    expect(decayedPpm({ startPpm: 1800, outdoorCo2Ppm: 420, achPerH: 1, hours: 1 })).toBeCloseTo(927.67, 2);
  });

  it('refuses readings at or below outdoor air', () => {
    expect(fitDecayLogLinear([0, 0.5], [800, 410], 420)).toBeNull();
  });
});

describe('analysis of synthetic logs with known air-change rates (ODE by odex, 15 ppm noise)', () => {
  it('recovers the lunch-time decay rate (3.0 h⁻¹) within 10 %', () => {
    const s = analyse(room());
    expect(s.decayInDay).not.toBeNull();
    expect(s.decayInDay!.achPerH).toBeGreaterThan(3 * 0.9);
    expect(s.decayInDay!.achPerH).toBeLessThan(3 * 1.1);
    expect(s.decayInDay!.events).toBeGreaterThanOrEqual(15);
  });

  it('recovers the after-school rate (0.4 h⁻¹) within 15 %', () => {
    const s = analyse(room());
    expect(s.decayAfterSchool!.achPerH).toBeGreaterThan(0.4 * 0.85);
    expect(s.decayAfterSchool!.achPerH).toBeLessThan(0.4 * 1.15);
  });

  it('recovers the lesson-time rate (2.0 h⁻¹) by build-up with the known generation within 10 %', () => {
    const s = analyse(room());
    expect(s.buildUp!.achPerH).toBeGreaterThan(2 * 0.9);
    expect(s.buildUp!.achPerH).toBeLessThan(2 * 1.1);
    expect(s.buildUp!.confidence).not.toBe('none');
  });

  it('recovers a well-ventilated room (lessons 5 h⁻¹) by build-up within 10 % and finds outdoor air from the nights', () => {
    const s = analyse(room({ lessonAch: 5, emptyAch: 5, nightAch: 1.5, seed: 7 }));
    expect(s.buildUp!.achPerH).toBeGreaterThan(5 * 0.9);
    expect(s.buildUp!.achPerH).toBeLessThan(5 * 1.1);
    // Nights decay at 1.5 h⁻¹ for 17 h: the night-time minima reach outdoor air (420 ppm) within the noise.
    expect(s.baseline.basis).toBe('night_minima');
    expect(Math.abs(s.baseline.ppm - 420)).toBeLessThan(30);
  });

  it('recovers the rates from one-minute and ten-minute logging', () => {
    for (const stepMinutes of [1, 10]) {
      const s = analyse(room({ stepMinutes, seed: 11 + stepMinutes }));
      expect(s.decayInDay!.achPerH / 3).toBeGreaterThan(0.88);
      expect(s.decayInDay!.achPerH / 3).toBeLessThan(1.12);
      expect(s.buildUp!.achPerH / 2).toBeGreaterThan(0.88);
      expect(s.buildUp!.achPerH / 2).toBeLessThan(1.12);
    }
  });

  it('counts only the 20 school days of four weeks and leaves the weekends out of the occupied statistics', () => {
    const s = analyse(room());
    expect(s.days).toBe(20);
    expect(s.daysWithReadings).toBe(28);
  });

  it('measures the occupied mean like the exact solution of worked example 1 case B (Q = 40 l/s: 2773.6 ppm)', () => {
    // Domain worked example 1 case B: constant 40 l/s (λ = 0.857 h⁻¹) all day from 420 ppm at 09:00 gives a
    // daily occupied mean of 2773.6 ppm. Our synthetic nights at 20 h⁻¹ flush the room to outdoor air by 09:00.
    const ach = (3.6 * 40) / 168;
    const s = analyse(room({ lessonAch: ach, emptyAch: ach, nightAch: 20, noisePpm: 0, stepMinutes: 1 }));
    expect(s.occupiedMeanPpm!).toBeGreaterThan(2773.6 - 15);
    expect(s.occupiedMeanPpm!).toBeLessThan(2773.6 + 15);
    // Case B: first above 2000 ppm at 09:38.9 and above it until 13:03.9, 205.0 min (example 1).
    const run = s.thresholds.find((t) => t.thresholdPpm === 2000)!;
    expect(Math.abs(run.longestRunMinutesMedianDay - 205)).toBeLessThanOrEqual(2);
    expect(s.criterionMet).toBe(false);
  });

  it('says an estimate from few events has low confidence', () => {
    const s = analyse(room(), 8);
    expect(s.days).toBe(6);
    expect(['low', 'medium']).toContain(s.decayInDay!.confidence);
    expect(s.occupiedStatsConfidence).toBe('low');
  });
});
