/**
 * The appraisal against named baselines, checked by hand on a climate flat enough to add up by hand, and the
 * engine defects the independent check found (each test below failed before its fix).
 */
import { describe, expect, it } from 'vitest';
import { baselineWords, comparisonWords } from '~/lib/engine/appraisal';
import { assessRoom, DEFAULT_ASSUMPTIONS } from '~/lib/engine/index';
import type { AssumptionSet, RoomAssessmentInput } from '~/lib/engine/types';
import { deGidsPhaff } from '~/lib/engine/window-airflow';
import { typicalClassroom } from './helpers';

/**
 * Every hour at 6 °C (no daily cycle, no spread), heating to 20 °C below a 14 °C cut-off: degree-hours are
 * school days × day length × 14 K = 190 × 6.25 × 14 = 16,625 K·h. Units run 190 × (6.25 + 1) = 1,377.5 h.
 */
function flatSet(): AssumptionSet {
  const set = structuredClone(DEFAULT_ASSUMPTIONS);
  set.version = 'test-flat';
  for (const r of Object.values(set.climate.regions.value)) r.monthlyMeanTempC = Array.from({ length: 12 }, () => 6);
  set.climate.dailyRangeK.value = Array.from({ length: 12 }, () => 0);
  set.climate.dayToDaySdK.value = Array.from({ length: 12 }, () => 0);
  return set;
}

/** A 1960s classroom with supply-and-extract fans moving 250 l/s and no heat recovery. */
function fannedRoom(): RoomAssessmentInput {
  const input = typicalClassroom();
  input.room.ventilationType = 'mechanical_supply_extract';
  input.room.mechanicalSupplyLps = 250;
  input.school.heatingEfficiency = 0.8;
  input.school.fuelPriceGbpPerKwh = 0.07;
  return input;
}

describe('appraisal against the same air without heat recovery (baseline b)', () => {
  const set = flatSet();
  const a = assessRoom(fannedRoom(), set);
  const r = a.appraisal;

  it('states the hours it used: 16,625 heating degree-hours and 1,377.5 unit run hours', () => {
    expect(a.hours.heatingDegreeHoursKh).toBeCloseTo(16625, 6);
    expect(a.hours.unitRunHoursPerYear).toBeCloseTo(1377.5, 9);
    expect(a.hours.timetableSource).toBe('assumption set');
  });

  it('lets the units take over the existing 250 l/s: Wall unit 250 at £7,500', () => {
    expect(r?.replacesExistingLps).toBe(250);
    expect(r?.installedSupplyLps).toBe(250);
    expect(r?.capitalCostGbp).toBe(7500);
  });

  it('saves heating η·ρc_p·Q·DH/1000/efficiency = 0.78 × 1.2 × 250 × 16,625 / 1000 / 0.8 = 4,862.8 kWh (CIBSE TM41 form, EN 308 η)', () => {
    const b = r?.baselines.same_air_without_recovery;
    expect(Math.abs((b?.annual.heatingKwh ?? 0) - 4862.8125)).toBeLessThanOrEqual(0.01);
    expect(Math.abs((b?.annual.heatingGbp ?? 0) - 4862.8125 * 0.07)).toBeLessThanOrEqual(0.01);
  });

  it('saves fan electricity (2.0 − 1.3) × 250 × 1,377.5 / 1000 = 241.06 kWh: old central fans use more (EN 16798-3 SFP)', () => {
    const b = r?.baselines.same_air_without_recovery;
    expect(Math.abs((b?.annual.fanKwh ?? 0) - 241.0625)).toBeLessThanOrEqual(0.01);
  });

  it('counts servicing like for like (share 1): no maintenance line, and so pays back on £350.66 a year', () => {
    const b = r?.baselines.same_air_without_recovery;
    // Hand: 4862.8125 × 0.07 + 241.0625 × 0.25 + 0 = 340.397 + 60.266 = 400.66 £/yr; simple payback 7500 / 400.66 = 18.72 yr.
    expect(Math.abs((b?.annual.maintenanceGbp ?? 1) - 0)).toBeLessThanOrEqual(1e-9);
    expect(Math.abs((b?.annualNetSavingGbp ?? 0) - 400.66)).toBeLessThanOrEqual(0.01);
    expect(Math.abs((b?.simplePaybackYears ?? 0) - 18.719)).toBeLessThanOrEqual(0.01);
    expect(b?.verdict).toBe('saves_slowly');
    expect(baselineWords(b!, 15)).toMatch(
      /^Against the same air without heat recovery, the units save about £401 a year after fans and servicing/,
    );
  });

  it('pays back within the period when the room is heated electrically (price £0.25, efficiency 1)', () => {
    const electric = fannedRoom();
    electric.school.heatingFuel = 'electric';
    electric.school.heatingEfficiency = 1;
    electric.school.fuelPriceGbpPerKwh = null;
    const b = assessRoom(electric, set).appraisal?.baselines.same_air_without_recovery;
    // Hand: heat 0.78 × 1.2 × 250 × 16,625 / 1000 / 1 = 3,890.25 kWh × £0.25 = £972.56; fans £60.27 → £1,032.83 a year;
    // payback 7500 / 1032.83 = 7.26 years; NPV at 3.5 % over 15 years = −7500 + 1032.83 × 11.517411 = £4,395.5.
    expect(Math.abs((b?.annualNetSavingGbp ?? 0) - 1032.83)).toBeLessThanOrEqual(0.01);
    expect(Math.abs((b?.npvGbp ?? 0) - 4395.5)).toBeLessThanOrEqual(0.5);
    expect(b?.verdict).toBe('pays_back');
  });
});

describe('defects the independent check found', () => {
  it('de Gids & Phaff take the 10 m meteorological wind, not the site-corrected wind (de Gids & Phaff 1982)', () => {
    const set = structuredClone(DEFAULT_ASSUMPTIONS);
    set.windows.method.value = 'de_gids_phaff';
    const input = typicalClassroom();
    const a = assessRoom(input, set);
    const w = a.seasons.winter;
    const area = 3 * set.windows.effectiveOpeningFactor.value.top_hung;
    const capacity = deGidsPhaff({
      areaM2: area,
      windSpeed10Ms: set.climate.regions.value.midlands.windSpeedMs.winter,
      openingHeightM: 1.2,
      deltaTK: w.indoorTempC - w.outdoorTempC,
    }).flowM3s;
    expect(Math.abs(w.ventilation.windowLps - 1000 * capacity * w.windowOpenFraction)).toBeLessThanOrEqual(1e-6);
  });

  it('an extract fan and infiltration combine in quadrature, Q = √(Q_fan² + Q_inf²) (ASHRAE Handbook—Fundamentals 2017 ch. 16)', () => {
    const input = typicalClassroom();
    input.room.ventilationType = 'mechanical_extract';
    input.room.mechanicalSupplyLps = 100;
    input.room.openableAreaM2 = 0;
    const w = assessRoom(input, DEFAULT_ASSUMPTIONS).seasons.winter.ventilation;
    // Infiltration 15.556 l/s (system-built default, K-P rule) → √(100² + 15.556²) = 101.20 l/s, not 115.56.
    expect(Math.abs(w.totalLps - Math.hypot(100, w.infiltrationLps))).toBeLessThanOrEqual(1e-9);
    expect(Math.abs(w.totalLps - 101.2)).toBeLessThanOrEqual(0.01);
  });

  it('a block heated by its own fuel is priced with that fuel, never with the school’s price and efficiency', () => {
    const input = typicalClassroom();
    input.school.heatingFuel = 'gas';
    input.school.fuelPriceGbpPerKwh = 0.064;
    input.school.heatingEfficiency = 0.78;
    input.block.heatingFuel = 'electric';
    const h = assessRoom(input, DEFAULT_ASSUMPTIONS).heating;
    expect(h).toMatchObject({ fuel: 'electric', priceGbpPerKwh: 0.25, priceSource: 'trust', efficiency: 1 });
    input.block.fuelPriceGbpPerKwh = 0.21;
    expect(assessRoom(input, DEFAULT_ASSUMPTIONS).heating).toMatchObject({
      priceGbpPerKwh: 0.21,
      priceSource: 'block',
    });
  });

  it('says "better air costs energy" only when the units bring more air and cost more; less air is said as less', () => {
    const wideOpen = typicalClassroom();
    wideOpen.room.openableAreaM2 = 8;
    wideOpen.room.winterWindowOpenFraction = 1; // staff say the windows stand open all winter
    const r = assessRoom(wideOpen, DEFAULT_ASSUMPTIONS).appraisal!;
    expect(r.winterOutdoorAirWithUnitsLps).toBeLessThan(r.winterOutdoorAirTodayLps);
    expect(comparisonWords(r)).not.toMatch(/^Better air costs energy/);
    expect(comparisonWords(r)).toMatch(/about the same or less air than today|no more air than today/);
    const shut = typicalClassroom();
    shut.room.winterWindowOpenFraction = 0;
    const s = assessRoom(shut, DEFAULT_ASSUMPTIONS).appraisal!;
    expect(s.winterOutdoorAirWithUnitsLps).toBeGreaterThan(s.winterOutdoorAirTodayLps);
  });

  it('a room whose windows staff say are kept shut in winter has worse winter CO2, and the result says the value came from the room', () => {
    const shut = typicalClassroom();
    shut.room.winterWindowOpenFraction = 0;
    const a = assessRoom(shut, DEFAULT_ASSUMPTIONS);
    const b = assessRoom(typicalClassroom(), DEFAULT_ASSUMPTIONS);
    expect(a.windows.winterSource).toBe('room');
    expect(b.windows.winterSource).toBe('assumption set');
    expect(a.seasons.winter.occupiedMeanCo2Ppm).toBeGreaterThan(b.seasons.winter.occupiedMeanCo2Ppm);
  });

  it('keeps unknown values unknown and says what it assumed for them', () => {
    const input = typicalClassroom();
    input.room.pupils = null;
    input.room.glazingAreaM2 = null;
    input.room.openableAreaM2 = null;
    input.room.ventilationType = null;
    const a = assessRoom(input, DEFAULT_ASSUMPTIONS);
    const fields = a.assumed.map((x) => x.field);
    expect(fields).toEqual(
      expect.arrayContaining(['room.pupils', 'room.glazingAreaM2', 'room.openableAreaM2', 'room.ventilationType']),
    );
    // 56 m² ÷ 2 m² a pupil = 28 pupils (defaults.room.floorAreaPerPupilM2).
    expect(a.pupils).toBe(28);
  });
});

describe('replacements within the appraisal period', () => {
  it('nets the units replaced at 15 years against a simpler option replaced at 10 and 20 (Green Book: costs in the year they fall)', () => {
    const set = flatSet();
    set.finance.appraisalYears.value = 30;
    set.retrofit.simplerOption.value = { ...set.retrofit.simplerOption.value, lifeYears: 10 };
    const input = typicalClassroom();
    input.room.winterWindowOpenFraction = 0;
    const r = assessRoom(input, set).appraisal;
    const simpler = r?.baselines.simpler_option;
    expect(simpler).not.toBeNull();
    const simpleCapital = 1500 + 12 * (r?.installedSupplyLps ?? 0);
    // Units (life 15) are bought again in year 15; the simpler option (life 10) in years 10 and 20.
    expect(simpler?.replacements).toEqual([
      { year: 15, costGbp: r?.capitalCostGbp },
      { year: 10, costGbp: -simpleCapital },
      { year: 20, costGbp: -simpleCapital },
    ]);
    // Against today (no capital), only the units' own replacement in year 15.
    expect(r?.baselines.today.replacements).toEqual([{ year: 15, costGbp: r?.capitalCostGbp }]);
  });
});
