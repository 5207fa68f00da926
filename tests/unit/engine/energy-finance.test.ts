import { describe, expect, it } from 'vitest';
import {
  annualVentilationHeatKwh,
  fanEnergyKwh,
  fuelForHeatKwh,
  heatRecoveredKwh,
  netCarbonSavingKg,
  supplyTempAfterRecoveryC,
  ventilationHeatLossW,
} from '~/lib/engine/energy';
import {
  annuityFactor,
  discountedPaybackClosedFormYears,
  discountedPaybackYears,
  equivalentAnnualCostGbp,
  npvLevel,
  simplePaybackYears,
} from '~/lib/engine/finance';

const near = (actual: number | null, expected: number, tol: number) => {
  expect(actual).not.toBeNull();
  expect(Math.abs((actual ?? Number.NaN) - expected)).toBeLessThanOrEqual(tol);
};

describe('worked example 5: one classroom unit (docs/sources.md)', () => {
  const heat = annualVentilationHeatKwh({ flowLps: 250, degreeHoursKh: 11000, airHeatCapacityWPerLpsK: 1.2 });
  const recovered = heatRecoveredKwh({ ventilationHeatKwh: heat, heatRecoveryEfficiency: 0.75 });
  const fuel = fuelForHeatKwh({ heatKwh: recovered, efficiency: 0.85 });
  const fan = fanEnergyKwh({ specificFanPowerWPerLps: 1.2, flowLps: 250, runHours: 1330 });

  it('ventilation heat loss 250 L/s × 11,000 K·h = 3300 kWh (CIBSE TM41 degree-hours, ρc_p 1.2, by hand)', () =>
    near(heat, 3300, 0.01));
  it('heat recovered at η 0.75 = 2475 kWh and boiler fuel at 0.85 = 2911.76 kWh (EN 308 dry temperature ratio, by hand)', () => {
    near(recovered, 2475, 0.01);
    near(fuel, 2911.76, 0.01);
  });
  it('fan energy at SFP 1.2 for 1330 h = 399.0 kWh (EN 16798-3 specific fan power, by hand)', () =>
    near(fan, 399, 0.01));
  it('instantaneous recovery at 5 °C outdoors is 3375 W (EN 308, by hand)', () => {
    near(
      0.75 * ventilationHeatLossW({ flowLps: 250, indoorTempC: 20, outdoorTempC: 5, airHeatCapacityWPerLpsK: 1.2 }),
      3375,
      1e-9,
    );
  });
  it('net carbon 2911.76 kWh gas @0.183 − 399 kWh @0.207 = 450.26 kgCO2e/yr (DESNZ conversion factors, by hand)', () => {
    near(
      netCarbonSavingKg({ fuelSavedKwh: fuel, fuelKgCo2ePerKwh: 0.183, fanKwh: fan, electricityKgCo2ePerKwh: 0.207 }),
      450.26,
      0.05,
    );
  });
});

describe('supply temperature after heat recovery', () => {
  it('5 °C outdoors, 20 °C extract, η 0.75 → 16.25 °C (EN 308 definition)', () => {
    expect(supplyTempAfterRecoveryC({ outdoorTempC: 5, extractTempC: 20, heatRecoveryEfficiency: 0.75 })).toBeCloseTo(
      16.25,
      12,
    );
  });
});

describe('appraisal, worked example 6 (docs/sources.md)', () => {
  it('AF(3.5 %, 15) 11.51741, NPV −£1,393.04, EAC £520.95 for C0 £6,000 and S £400 (Green Book rate, by hand)', () => {
    near(annuityFactor(0.035, 15), 11.51741, 0.01);
    near(npvLevel({ capitalGbp: 6000, annualSavingGbp: 400, rate: 0.035, years: 15 }), -1393.04, 0.01);
    near(equivalentAnnualCostGbp({ capitalGbp: 6000, rate: 0.035, years: 15 }), 520.95, 0.01);
  });

  it('simple payback 15.0 years, discounted payback not reached within 15 years (worked example 6)', () => {
    near(simplePaybackYears(6000, 400), 15, 1e-12);
    expect(discountedPaybackYears({ capitalGbp: 6000, annualSavingGbp: 400, rate: 0.035 }) ?? Infinity).toBeGreaterThan(
      15,
    );
  });

  it('S £600: discounted payback 12.53 yr interpolated / 12.52 yr closed form (by hand)', () => {
    near(discountedPaybackYears({ capitalGbp: 6000, annualSavingGbp: 600, rate: 0.035 }), 12.53, 0.01);
    near(discountedPaybackClosedFormYears({ capitalGbp: 6000, annualSavingGbp: 600, rate: 0.035 }), 12.52, 0.01);
  });

  it('S £600 over 20 years: SPB 10.0, AF 14.2124, NPV £2,527.44 (worked example 6, 20-year variant)', () => {
    near(simplePaybackYears(6000, 600), 10, 1e-12);
    near(annuityFactor(0.035, 20), 14.2124, 0.0001);
    near(npvLevel({ capitalGbp: 6000, annualSavingGbp: 600, rate: 0.035, years: 20 }), 2527.44, 0.01);
  });

  it('reports "never" (null) when the saving is not positive or r·C0/S ≥ 1 (the closed-form discounted payback has no solution)', () => {
    expect(simplePaybackYears(6000, 0)).toBeNull();
    expect(simplePaybackYears(6000, -50)).toBeNull();
    // r·C0/S = 0.035·6000/200 = 1.05 ≥ 1
    expect(discountedPaybackYears({ capitalGbp: 6000, annualSavingGbp: 200, rate: 0.035 })).toBeNull();
  });

  it('with no discounting, discounted payback equals simple payback (AF(0, n) = n)', () => {
    near(discountedPaybackYears({ capitalGbp: 6000, annualSavingGbp: 400, rate: 0 }), 15, 1e-9);
    expect(annuityFactor(0, 12)).toBe(12);
  });
});

describe('worked example 7: money and carbon of example 5 (docs/sources.md)', () => {
  it('gas £0.07, electricity £0.25: gas saved £203.82, fan £99.75, S £104.07, simple payback 57.7 yr at £6,000', () => {
    const fuel = 2475 / 0.85;
    const gas = fuel * 0.07;
    const fanCost = 399 * 0.25;
    near(gas, 203.82, 0.01);
    near(fanCost, 99.75, 1e-9);
    near(gas - fanCost, 104.07, 0.01);
    near(simplePaybackYears(6000, gas - fanCost), 57.7, 0.05);
  });
});
