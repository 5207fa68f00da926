/**
 * Golden values from general-purpose reference libraries (npm, devDependencies only), so a later change cannot
 * drift: `financial` (a TypeScript port of numpy-financial) for NPV and IRR, `psychrolib` (ASHRAE Handbook
 * psychrometric formulas) for the heat capacity of air. The CO2 mass balance is checked against the `odex` ODE
 * integrator in co2-vs-ode.test.ts and PMV/PPD against the ISO 7730:2005 Annex D rows in comfort.test.ts.
 */
import fc from 'fast-check';
import { irr, npv } from 'financial';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { DEFAULT_ASSUMPTIONS } from '~/lib/engine/assumptions';
import { appraiseInvestment, npvLevel, npvOfFlows } from '~/lib/engine/finance';

/** The slice of psychrolib's API used here (it ships no types). */
interface Psychrolib {
  SI: unknown;
  SetUnitSystem(system: unknown): void;
  GetHumRatioFromRelHum(tDryBulbC: number, relHum: number, pressurePa: number): number;
  GetMoistAirDensity(tDryBulbC: number, humRatio: number, pressurePa: number): number;
  GetMoistAirEnthalpy(tDryBulbC: number, humRatio: number): number;
}
const psychrolib = createRequire(import.meta.url)('psychrolib') as Psychrolib;
psychrolib.SetUnitSystem(psychrolib.SI);

describe('finance against numpy-financial (the `financial` package)', () => {
  it('NPV of any end-of-year cash flows equals financial.npv (tolerance 1e-6 £)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -1_000_000, max: 1_000_000 }), { minLength: 1, maxLength: 40 }),
        fc.integer({ min: 0, max: 2000 }).map((bp) => bp / 10000),
        (pence, rate) => {
          const flows = pence.map((p) => p / 100);
          expect(Math.abs(npvOfFlows(flows, rate) - npv(rate, flows))).toBeLessThanOrEqual(1e-6);
        },
      ),
      { numRuns: 500, seed: 11 },
    );
  });

  it('NPV with unit replacement equals financial.npv of the year-by-year flows (C0 £7,500, S £900, replaced in year 10, 3.5 %, 15 years)', () => {
    const flows = [-7500, ...Array.from({ length: 15 }, (_, i) => (i + 1 === 10 ? 900 - 7500 : 900))];
    const ours = appraiseInvestment({
      capitalGbp: 7500,
      annualSavingGbp: 900,
      replacements: [{ year: 10, costGbp: 7500 }],
      rate: 0.035,
      years: 15,
    });
    expect(Math.abs(ours.npvGbp - npv(0.035, flows))).toBeLessThanOrEqual(1e-6);
  });

  it('the discounted payback year is where financial.npv of the flows so far turns positive', () => {
    const c0 = 6000;
    const s = 600;
    const dpb = appraiseInvestment({ capitalGbp: c0, annualSavingGbp: s, replacements: [], rate: 0.035, years: 20 })
      .discountedPaybackYears as number;
    const upTo = (n: number) => npv(0.035, [-c0, ...Array.from({ length: n }, () => s)]);
    expect(upTo(Math.floor(dpb))).toBeLessThan(0);
    expect(upTo(Math.ceil(dpb))).toBeGreaterThanOrEqual(0);
    // Worked example 6: 12.53 years by interpolation (Green Book discounting, hand-checked).
    expect(Math.abs(dpb - 12.53)).toBeLessThanOrEqual(0.01);
  });

  it('at the IRR financial.irr finds, our level-saving NPV is zero', () => {
    const rate = irr([-6000, ...Array.from({ length: 15 }, () => 600)]);
    expect(Math.abs(npvLevel({ capitalGbp: 6000, annualSavingGbp: 600, rate, years: 15 }))).toBeLessThanOrEqual(1e-6);
  });
});

describe('air properties against psychrolib (ASHRAE Handbook—Fundamentals psychrometrics)', () => {
  it('ρ·c_p of room air at 20 °C, 50 % RH, 101.325 kPa is 1.213 W per (L/s·K), the assumed rounded 1.2 within 1.5 %', () => {
    const p = 101325;
    const w = psychrolib.GetHumRatioFromRelHum(20, 0.5, p);
    const rho = psychrolib.GetMoistAirDensity(20, w, p); // kg of moist air per m³
    // c_p per kg of dry air from the enthalpy slope, per kg of moist air by 1/(1 + W).
    const cp = (psychrolib.GetMoistAirEnthalpy(21, w) - psychrolib.GetMoistAirEnthalpy(19, w)) / 2 / (1 + w);
    const rhoCpWPerLpsK = (rho * cp) / 1000;
    const assumed = DEFAULT_ASSUMPTIONS.energy.airHeatCapacityWPerLpsK.value;
    expect(Math.abs(rhoCpWPerLpsK - 1.2135)).toBeLessThanOrEqual(0.001);
    expect(Math.abs(rhoCpWPerLpsK - assumed) / assumed).toBeLessThanOrEqual(0.015);
  });
});
