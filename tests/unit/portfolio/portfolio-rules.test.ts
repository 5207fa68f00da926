import { describe, expect, it } from 'vitest';
import { guardCell } from '../../../src/lib/server/portfolio/priorities-export';
import { heatingRenewalFlag } from '../../../src/lib/server/portfolio/heating-renewal';
import { sensitivityCase } from '../../../src/lib/server/portfolio/sensitivity';

// The portfolio feature's own small rules, checked without the server.

describe('heating renewal flag', () => {
  // Common practice, no single source: fossil-fuel plant lasts about 20–25 years; we flag at 20 years, 5 years ahead.
  it('flags gas plant installed 2003 in 2026 (20 years reached in 2023)', () => {
    expect(heatingRenewalFlag({ fuel: 'gas', installedYear: 2003, currentYear: 2026 })).toEqual({
      fuel: 'gas',
      installedYear: 2003,
      expectedEndYear: 2023,
    });
  });
  it('flags oil plant reaching 20 years exactly 5 years from now, and not a year later', () => {
    expect(heatingRenewalFlag({ fuel: 'oil', installedYear: 2011, currentYear: 2026 })?.expectedEndYear).toBe(2031);
    expect(heatingRenewalFlag({ fuel: 'oil', installedYear: 2012, currentYear: 2026 })).toBeNull();
  });
  it('never flags heat pumps, electric heating or plant without an installation year', () => {
    expect(heatingRenewalFlag({ fuel: 'heat_pump', installedYear: 1990, currentYear: 2026 })).toBeNull();
    expect(heatingRenewalFlag({ fuel: 'electric', installedYear: 1990, currentYear: 2026 })).toBeNull();
    expect(heatingRenewalFlag({ fuel: 'lpg', installedYear: null, currentYear: 2026 })).toBeNull();
  });
});

describe('programme sensitivity', () => {
  const money = { capitalCostGbp: 100_000, annualNetSavingGbp: 6_000, annualMaintenanceGbp: 1_000 };

  it('scales only the energy part of the saving with the price (maintenance stays)', () => {
    // Energy part at baseline = 6,000 + 1,000 = 7,000; at +30 % it is 9,100, less 1,000 maintenance.
    expect(
      sensitivityCase(money, { energyPriceChangePct: 30, discountRate: 0.035, appraisalYears: 15 }).annualSavingGbp,
    ).toBeCloseTo(8_100, 6);
    expect(
      sensitivityCase(money, { energyPriceChangePct: -30, discountRate: 0.035, appraisalYears: 15 }).annualSavingGbp,
    ).toBeCloseTo(3_900, 6);
  });

  it('gives the Green Book NPV and a simple payback of capital over saving', () => {
    // Annuity factor at 3.5 % over 15 years, (1 − 1.035^−15)/0.035 = 11.5174 (HM Treasury Green Book discounting, end-of-year flows).
    const c = sensitivityCase(money, { energyPriceChangePct: 0, discountRate: 0.035, appraisalYears: 15 });
    expect(c.npvGbp).toBeCloseTo(-100_000 + 6_000 * 11.5174, -1);
    expect(c.simplePaybackYears).toBeCloseTo(100_000 / 6_000, 6);
  });

  it('says "never" when energy prices fall so far that the units cost more to run than they save', () => {
    const c = sensitivityCase(
      { capitalCostGbp: 10_000, annualNetSavingGbp: 200, annualMaintenanceGbp: 500 },
      { energyPriceChangePct: -30, discountRate: 0.035, appraisalYears: 15 },
    );
    expect(c.annualSavingGbp).toBeCloseTo(-10, 6);
    expect(c.simplePaybackYears).toBeNull();
    expect(c.discountedPaybackYears).toBeNull();
  });
});

describe('export formula guard', () => {
  it('keeps text that a spreadsheet would run as a formula as text', () => {
    for (const risky of ['=1+2', '+44 20', '-3', '@SUM(A1)', '\tx', '\rx']) expect(guardCell(risky)).toBe(`'${risky}`);
    expect(guardCell('Classroom 3')).toBe('Classroom 3');
  });
});
