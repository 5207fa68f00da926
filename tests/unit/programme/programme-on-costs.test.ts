import { describe, expect, it } from 'vitest';
import { costFactor, onCostBreakdown } from '~/lib/engine/programme/on-costs';
import type { OnCostRates } from '~/lib/engine/programme/types';

// Worked example built from first principles in this test (no published worked example of these rates was
// found): the cost-limit build-up order of RICS NRM 1, 2nd edition (secondary source: quantity-surveying
// guidance summarising it) — works, + preliminaries, + fees on works and preliminaries, + risk allowance on
// that base cost, + inflation compounded per year, VAT assessed last. The rates are demo values.
const rates: OnCostRates = {
  preliminariesRate: 0.1,
  feesRate: 0.12,
  contingencyRate: 0.1,
  inflationRatePerYear: 0.035,
  vatRate: 0.2,
  vatRecoverable: true,
};

describe('on-costs on £10,000 of installed units', () => {
  // Step by step, by hand: 10,000 → +1,000 prelims = 11,000 → +12 % fees 1,320 = 12,320 → +10 % contingency
  // 1,232 = 13,552 (cost limit today) → year 3: × 1.035² = 14,517.24 net → 20 % VAT 2,903.45 → 17,420.69 gross.
  const year3 = onCostBreakdown(10_000, rates, 3);

  it('adds preliminaries on the works, fees on works plus preliminaries, contingency on the base cost', () => {
    expect(year3.preliminariesGbp).toBeCloseTo(1000, 6);
    expect(year3.feesGbp).toBeCloseTo(1320, 6);
    expect(year3.contingencyGbp).toBeCloseTo(1232, 6);
  });

  it('inflates the cost limit to programme year 3 by two years of 3.5 % (14,517.24 net of VAT)', () => {
    expect(year3.netGbp).toBeCloseTo(14_517.2412, 3);
    expect(year3.inflationGbp).toBeCloseTo(965.2412, 3);
  });

  it('adds VAT at 20 % on the net (17,420.69 gross) and charges the net when the trust recovers VAT', () => {
    expect(year3.vatGbp).toBeCloseTo(2903.44824, 3);
    expect(year3.grossGbp).toBeCloseTo(17_420.68944, 3);
    expect(year3.chargedGbp).toBeCloseTo(14_517.2412, 3);
    expect(onCostBreakdown(10_000, { ...rates, vatRecoverable: false }, 3).chargedGbp).toBeCloseTo(17_420.68944, 3);
  });

  it('adds no inflation in the first programme year (prices are at its start)', () => {
    const year1 = onCostBreakdown(10_000, rates, 1);
    expect(year1.inflationGbp).toBe(0);
    expect(year1.netGbp).toBeCloseTo(13_552, 6);
  });

  it('is one factor per year, so it scales with the price (and the plan may multiply)', () => {
    expect(costFactor(rates, 3) * 25_000).toBeCloseTo(onCostBreakdown(25_000, rates, 3).chargedGbp, 6);
  });

  it('refuses a year before the first', () => {
    expect(() => onCostBreakdown(10_000, rates, 0)).toThrow(/programme year/);
  });
});
