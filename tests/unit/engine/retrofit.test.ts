import { describe, expect, it } from 'vitest';
import { DEFAULT_ASSUMPTIONS } from '~/lib/engine/assumptions';
import {
  annualVentilationHeatKwh,
  fanEnergyKwh,
  fuelForHeatKwh,
  heatRecoveredKwh,
  netCarbonSavingKg,
} from '~/lib/engine/energy';
import { appraiseInvestment, simplePaybackYears } from '~/lib/engine/finance';
import {
  capitalPerTonneCo2eGbp,
  chooseUnits,
  combinedSoundDbA,
  pupilHoursPer1000Gbp,
  requiredOutdoorAirLps,
} from '~/lib/engine/retrofit';

const catalogue = DEFAULT_ASSUMPTIONS.retrofit.unitCatalogue.value;

describe('flow needed to meet the mechanical criterion', () => {
  it('inverts the steady state: G 0.148319 L/s, limit 1350 ppm, C_o 420 → 159.48 L/s (Batterman 2017 steady-state form)', () => {
    // Hand: 10^6 · 0.148319 / (1350 − 420) = 148319 / 930 = 159.483 L/s (the 2000 ppm maximum needs less: 93.87 L/s).
    const q = requiredOutdoorAirLps({
      generationLps: 0.148319,
      outdoorCo2Ppm: 420,
      meanLimitPpm: 1350,
      maxLimitPpm: 2000,
    });
    expect(Math.abs((q ?? 0) - 159.483)).toBeLessThanOrEqual(0.001);
  });

  it('inverts the plateau example: 1500 ppm needs 137.33 L/s (Batterman 2017 steady-state method, by hand)', () => {
    const q = requiredOutdoorAirLps({
      generationLps: 0.148319,
      outdoorCo2Ppm: 420,
      meanLimitPpm: 1500,
      maxLimitPpm: null,
    });
    expect(Math.abs((q ?? 0) - 137.33)).toBeLessThanOrEqual(0.01);
  });

  it('returns null when the limit is at or below outdoor CO2', () => {
    expect(
      requiredOutdoorAirLps({ generationLps: 0.1, outdoorCo2Ppm: 420, meanLimitPpm: 400, maxLimitPpm: null }),
    ).toBeNull();
  });
});

describe('choosing units from the catalogue', () => {
  it('picks the cheapest combination that meets 159 L/s within 40 dB(A): Ceiling cassette 100 + Sill unit 60 at £7,300', () => {
    // Hand enumeration of the default catalogue (60 L/s £2,800; 100 L/s £4,500; 150 L/s £5,500; 250 L/s £7,500)
    // for ≥ 159 L/s: 100+60 = 160 L/s £7,300; 1×250 £7,500; 150+60 £8,300; 3×60 £8,400; 2×100 £9,000 → 100+60.
    // Sound: 10·log10(10^3.1 + 10^2.8) = 32.76 dB(A).
    const c = chooseUnits({ requiredSupplyLps: 159, catalogue, soundLimitDbA: 40, maxUnits: 6 });
    expect(c?.capitalCostGbp).toBe(7300);
    expect(c?.flowLps).toBe(160);
    expect(c?.lines.map((l) => `${l.model.id}×${l.count}`).sort()).toEqual(['ceiling-100×1', 'sill-60×1']);
    expect(Math.abs((c?.soundDbA ?? 0) - 32.76)).toBeLessThanOrEqual(0.01);
    expect(c?.soundLimitMet).toBe(true);
  });

  it('prefers a combination within the sound limit even when dearer', () => {
    // 300 L/s with a 38 dB(A) limit: 2×150 £11,000 gives 33 + 3.01 = 36.01 dB(A) (ok); 250+60 £10,300 gives
    // 10·log10(10^3.6 + 10^2.8) = 36.64 dB(A) (ok) and is cheaper → £10,300. With a 36.3 limit only 2×150 (36.01) and
    // 3×100 (31 + 4.77 = 35.77, £13,500) qualify → 2×150 at £11,000.
    expect(chooseUnits({ requiredSupplyLps: 300, catalogue, soundLimitDbA: 38, maxUnits: 6 })?.capitalCostGbp).toBe(
      10300,
    );
    const quiet = chooseUnits({ requiredSupplyLps: 300, catalogue, soundLimitDbA: 36.3, maxUnits: 6 });
    expect(quiet?.capitalCostGbp).toBe(11000);
    expect(quiet?.soundLimitMet).toBe(true);
  });

  it('falls back to the cheapest flow-meeting set, flagged, when nothing is quiet enough', () => {
    const c = chooseUnits({ requiredSupplyLps: 159, catalogue, soundLimitDbA: 20, maxUnits: 6 });
    expect(c?.capitalCostGbp).toBe(7300);
    expect(c?.soundLimitMet).toBe(false);
  });

  it('returns null when no combination within the unit limit reaches the flow', () => {
    // 6 × 250 = 1500 L/s is the most the catalogue can supply.
    expect(chooseUnits({ requiredSupplyLps: 1501, catalogue, soundLimitDbA: 60, maxUnits: 6 })).toBeNull();
  });

  it('adds sound levels on an energy basis: two 36 dB(A) units make 39.01 dB(A)', () => {
    // 10·log10(2·10^3.6) = 36 + 3.0103
    expect(combinedSoundDbA([{ soundDbA: 36, count: 2 }])).toBeCloseTo(39.0103, 4);
  });
});

describe('money, energy and carbon of the units (worked examples 5–7 chained, as the appraisal chains them)', () => {
  // Worked example 5: 250 L/s balanced, DH_occ 11,000 K·h, η 0.75, boiler 0.85, fans 1,330 h at SFP 1.2 W/(L/s);
  // example 7: gas £0.07, electricity £0.25; factors gas 0.183, electricity 0.207 kgCO2e/kWh; C0 £6,000.
  const loss = annualVentilationHeatKwh({ flowLps: 250, degreeHoursKh: 11000, airHeatCapacityWPerLpsK: 1.2 });
  const recovered = heatRecoveredKwh({ ventilationHeatKwh: loss, heatRecoveryEfficiency: 0.75 });
  const fuel = fuelForHeatKwh({ heatKwh: recovered, efficiency: 0.85 });
  const fan = fanEnergyKwh({ specificFanPowerWPerLps: 1.2, flowLps: 250, runHours: 1330 });
  const saving = fuel * 0.07 - fan * 0.25;
  const carbon = netCarbonSavingKg({
    fuelSavedKwh: fuel,
    fuelKgCo2ePerKwh: 0.183,
    fanKwh: fan,
    electricityKgCo2ePerKwh: 0.207,
  });

  it('recovers 2475 kWh, saves 2911.76 kWh of gas and uses 399 kWh of fan electricity (checks 20–22)', () => {
    expect(Math.abs(loss - 3300)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(recovered - 2475)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(fuel - 2911.76)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(fan - 399)).toBeLessThanOrEqual(0.01);
  });

  it('nets £104.07 and 450.26 kgCO2e a year, simple payback 57.7 years (worked example 7, docs/sources.md)', () => {
    expect(Math.abs(saving - 104.07)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(carbon - 450.26)).toBeLessThanOrEqual(0.05);
    expect(Math.abs((simplePaybackYears(6000, saving) ?? 0) - 57.7)).toBeLessThanOrEqual(0.05);
  });

  it('has NPV −£4,801.34 over 15 years at 3.5 % and no discounted payback', () => {
    // Hand: S = 2911.7647·0.07 − 399·0.25 = 104.0735; NPV = −6000 + 104.0735·11.517411 = −4801.34; r·C0/S = 2.02 ≥ 1 → never.
    const money = appraiseInvestment({
      capitalGbp: 6000,
      annualSavingGbp: saving,
      replacements: [],
      rate: 0.035,
      years: 15,
    });
    expect(Math.abs(money.npvGbp - -4801.34)).toBeLessThanOrEqual(0.05);
    expect(money.discountedPaybackYears).toBeNull();
  });

  const money = { annualNetSavingKgCo2e: carbon };

  it('costs £888.38 of capital per tonne CO2e over a 15-year life', () => {
    // Hand: 450.2647 kg × 15 / 1000 = 6.75397 t; 6000 / 6.75397 = 888.37 £/t.
    expect(Math.abs((capitalPerTonneCo2eGbp(6000, money.annualNetSavingKgCo2e, 15) ?? 0) - 888.37)).toBeLessThanOrEqual(
      0.05,
    );
    expect(capitalPerTonneCo2eGbp(6000, -10, 15)).toBeNull();
  });

  it('removes 2,000 pupil-hours per £1,000 when £7,500 removes 15,000 pupil-hours', () => {
    expect(pupilHoursPer1000Gbp(15000, 7500)).toBe(2000);
    expect(pupilHoursPer1000Gbp(15000, 0)).toBeNull();
  });
});
