/**
 * Calibration and measured evidence: the fitted window use makes the model reproduce the measured occupied mean;
 * a staler measurement means less window use; the measured risk is the model's own pupil-hour rule
 * (pupils × minutes above per day × school days ÷ 60, summed over seasons) fed with measured minutes.
 */
import { describe, expect, it } from 'vitest';
import { assessRoom, DEFAULT_ASSUMPTIONS } from '~/lib/engine';
import { applyMeasuredEvidence, calibrateRoom, type MeasuredRoom, type MeasuredSeason } from '~/lib/engine/measured';
import type { Season } from '~/lib/engine/types';
import { typicalClassroom } from '../engine/helpers';

const set = DEFAULT_ASSUMPTIONS;
const label = (days: number) => `calibrated from ${days} days of readings`;

function season(s: Season, days: number, meanPpm: number, minutesOver: number, threshold: number): MeasuredSeason {
  return {
    season: s,
    days,
    daysWithReadings: days,
    readings: days * 288,
    occupiedMeanPpm: meanPpm,
    dailyMeanP10Ppm: meanPpm,
    dailyMeanP90Ppm: meanPpm,
    peakPpm: meanPpm + 400,
    thresholds: [
      {
        thresholdPpm: threshold,
        shareAbove: 0.3,
        occupiedMinutesOverPerDay: minutesOver,
        longestRunMinutesMax: 40,
        longestRunMinutesMedianDay: 25,
      },
    ],
    meanMet: null,
    maxMet: null,
    criterionMet: null,
    occupiedStatsConfidence: 'high',
    baseline: {
      ppm: 420,
      basis: 'night_minima',
      nights: 20,
      confidence: 'high',
      warning: null,
      note: { method: '', source: '' },
    },
    decayInDay: null,
    decayAfterSchool: null,
    buildUp: null,
    notes: [],
  };
}

describe('calibration from measured seasons', () => {
  it('fits window use so the model reproduces the measured winter mean within 5 ppm', () => {
    const input = typicalClassroom();
    const before = assessRoom(input, set, { withCurve: false }).seasons.winter.occupiedMeanCo2Ppm;
    const measured = before + 300; // staler than predicted: windows opened less than assumed
    const fit = calibrateRoom({
      input,
      assumptions: set,
      targets: { winter: { occupiedMeanPpm: measured, baselinePpm: 420, days: 30 } },
      afterSchoolDecay: null,
      label,
    })!;
    const w = fit.seasons.winter!;
    expect(w.limit).toBe('none');
    expect(w.windowUseFactor).toBeLessThan(1);
    const after = assessRoom({ ...input, calibration: fit.calibration }, set, { withCurve: false }).seasons.winter
      .occupiedMeanCo2Ppm;
    expect(Math.abs(after - measured)).toBeLessThan(5);
    expect(fit.calibration.label).toBe('calibrated from 30 days of readings');
  });

  it('needs less window use for a staler room', () => {
    const input = typicalClassroom();
    const base = assessRoom(input, set, { withCurve: false }).seasons.winter.occupiedMeanCo2Ppm;
    const k = (delta: number) =>
      calibrateRoom({
        input,
        assumptions: set,
        targets: { winter: { occupiedMeanPpm: base + delta, baselinePpm: 420, days: 30 } },
        afterSchoolDecay: null,
        label,
      })!.seasons.winter!.windowUseFactor;
    expect(k(400)).toBeLessThan(k(100));
    expect(k(-100)).toBeGreaterThan(1);
  });

  it('stops at shut windows when even they cannot explain the measurement, and says so', () => {
    const input = typicalClassroom();
    const fit = calibrateRoom({
      input,
      assumptions: set,
      targets: { winter: { occupiedMeanPpm: 9000, baselinePpm: 420, days: 30 } },
      afterSchoolDecay: null,
      label,
    })!;
    expect(fit.seasons.winter!.limit).toBe('windows_shut');
    expect(fit.notes.join(' ')).toContain('more people');
  });

  it('takes infiltration from trustworthy after-school decays: Q = λ·V/3.6 (Batterman 2017)', () => {
    const input = typicalClassroom(); // 56 m² × 3 m = 168 m³
    const decay = {
      achPerH: 0.3,
      flowLps: (0.3 * 168) / 3.6,
      events: 20,
      rejected: 0,
      iqrAchPerH: 0.05,
      fitQuality: 0.97,
      confidence: 'high' as const,
      note: { method: '', source: '' },
    };
    const fit = calibrateRoom({
      input,
      assumptions: set,
      targets: { winter: { occupiedMeanPpm: 1400, baselinePpm: 420, days: 30 } },
      afterSchoolDecay: decay,
      label,
    })!;
    expect(fit.calibration.infiltrationLps).toBeCloseTo(14, 6);
    expect(fit.infiltration.source).toBe('after_school_decays');
  });

  it('refuses with fewer than 5 good days', () => {
    expect(
      calibrateRoom({
        input: typicalClassroom(),
        assumptions: set,
        targets: { winter: { occupiedMeanPpm: 1400, baselinePpm: 420, days: 4 } },
        afterSchoolDecay: null,
        label,
      }),
    ).toBeNull();
  });
});

describe('measured evidence in the risk', () => {
  it('builds pupil-hours from measured minutes with the model’s rule when every season is measured', () => {
    const input = typicalClassroom();
    const assessment = assessRoom(input, set, { withCurve: false });
    const th = assessment.criterion.riskThresholdPpm;
    const measured: MeasuredRoom = {
      seasons: {
        winter: season('winter', 30, 1600, 60, th),
        mid: season('mid', 20, 1300, 30, th),
        summer: season('summer', 12, 900, 0, th),
      },
      days: 62,
      firstDate: '2026-01-05',
      lastDate: '2026-07-10',
    };
    const { risk, evidence } = applyMeasuredEvidence({
      assessment,
      measured,
      assumptions: set,
      calibrationLabel: null,
    });
    const days = set.seasons.value;
    // pupils × Σ (minutes over per day × school days) ÷ 60, as the model's risk (engine/risk.ts).
    const expected = (30 * (60 * days.winter.schoolDays + 30 * days.mid.schoolDays + 0 * days.summer.schoolDays)) / 60;
    expect(risk.pupilHoursPerYearAbove).toBeCloseTo(expected, 6);
    expect(evidence).toMatchObject({
      kind: 'measured',
      measuredSeasons: ['winter', 'mid', 'summer'],
      measuredDays: 62,
    });
    expect(risk.reason).toMatch(/^Measured over 62 school days/);
  });

  it('keeps the prediction for seasons with too few days, and says the room is calibrated when it is not measured', () => {
    const input = typicalClassroom();
    const assessment = assessRoom(input, set, { withCurve: false });
    const th = assessment.criterion.riskThresholdPpm;
    const thin: MeasuredRoom = {
      seasons: { winter: season('winter', 9, 1600, 60, th) },
      days: 9,
      firstDate: null,
      lastDate: null,
    };
    const result = applyMeasuredEvidence({
      assessment,
      measured: thin,
      assumptions: set,
      calibrationLabel: 'calibrated from 9 days of readings',
    });
    expect(result.risk).toEqual(assessment.risk);
    expect(result.evidence.kind).toBe('calibrated');
    expect(
      applyMeasuredEvidence({ assessment, measured: null, assumptions: set, calibrationLabel: null }).evidence.kind,
    ).toBe('predicted');
  });
});
