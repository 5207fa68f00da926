import { describe, expect, it } from 'vitest';
import {
  criterionBand,
  RISK_BAND_LABELS,
  riskBandNumber,
  riskBandOfNumber,
  riskPriority,
  type SeasonCriterionMeasures,
} from '../../../src/lib/engine/risk';

// The criterion is published: BB101 (2018) refurbishment, natural ventilation: daily mean below 1,750 ppm and no
// more than 20 consecutive minutes above 2,000 ppm (ESFA Building Bulletin 101, 2018, via secondary summaries).
// The bands around it are an Airtally screening rule: common practice, no single source. "Far over" is a daily
// mean at least a quarter above the limit (the default assumption risk.farOverShare = 0.25).
const BB101_REFURB_NATURAL = { meanLimitPpm: 1750, maxMinutesCap: 20, farOverShare: 0.25 };
const season = (occupiedMeanCo2Ppm: number, longestRunAboveMaxMinutes = 0): SeasonCriterionMeasures => ({
  occupiedMeanCo2Ppm,
  longestRunAboveMaxMinutes,
});
const band = (...seasons: SeasonCriterionMeasures[]) => criterionBand({ ...BB101_REFURB_NATURAL, seasons });

describe('the band rule: how far and how long above the criterion', () => {
  it('meets when every daily mean is within the limit and no run above the maximum is longer than allowed', () => {
    expect(band(season(1750, 20), season(900), season(600))).toBe('meets');
  });

  it('peaks over when the means are within the limit but one run above the maximum is longer than 20 minutes', () => {
    expect(band(season(1700, 21), season(900), season(600))).toBe('peaks_over');
  });

  it('is over when a season’s daily mean is above the limit by less than a quarter', () => {
    // 1,750 × 1.25 = 2,187.5 ppm is the start of "far over".
    expect(band(season(1751), season(900), season(600))).toBe('over');
    expect(band(season(2187), season(900), season(600))).toBe('over');
  });

  it('is far over from a quarter above the limit', () => {
    expect(band(season(2188), season(900), season(600))).toBe('far_over');
  });

  it('orders rooms judged by one criterion by their air: 2,186 ppm is never better banded than 1,982 ppm', () => {
    // The case that confused people: bands named after air quality but computed from pupil-hours.
    const numberOf = (ppm: number) => riskBandNumber(band(season(ppm)));
    expect(numberOf(2186)).toBeGreaterThanOrEqual(numberOf(1982));
    expect(RISK_BAND_LABELS[band(season(1982))]).toMatch(/over the limit/);
  });

  it('numbers priorities the way the trade does: 1 = most urgent (far over) … 4 = meets its criterion', () => {
    expect(riskPriority('far_over')).toBe(1);
    expect(riskPriority('over')).toBe(2);
    expect(riskPriority('peaks_over')).toBe(3);
    expect(riskPriority('meets')).toBe(4);
  });

  it('stores bands as 1 (meets) … 4 (far over) and reads them back', () => {
    for (const b of ['meets', 'peaks_over', 'over', 'far_over'] as const)
      expect(riskBandOfNumber(riskBandNumber(b))).toBe(b);
    expect(riskBandNumber('far_over')).toBe(4);
  });

  it('has no maximum test when the criterion has none (EN 16798-1 categories): a long run alone is not a band', () => {
    expect(
      criterionBand({ meanLimitPpm: 1200, maxMinutesCap: null, farOverShare: 0.25, seasons: [season(1100, 0)] }),
    ).toBe('meets');
  });
});
