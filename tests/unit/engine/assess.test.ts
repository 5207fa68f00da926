import { describe, expect, it } from 'vitest';
import { assessRoom, DEFAULT_ASSUMPTIONS, EngineInputError } from '~/lib/engine/index';
import { exampleOneAssumptions, exampleOneRoom, typicalClassroom } from './helpers';

const ex1 = exampleOneAssumptions();

describe('assessRoom reproduces worked example 1 through the entry point', () => {
  it('case A, 155 L/s: occupied mean 1139.5 ppm in every season (worked example 1, docs/sources.md)', () => {
    const a = assessRoom(exampleOneRoom(155), ex1);
    for (const s of ['winter', 'mid', 'summer'] as const) {
      expect(a.seasons[s].ventilation).toEqual({ windowLps: 0, infiltrationLps: 0, mechanicalLps: 155, totalLps: 155 });
      expect(Math.abs(a.seasons[s].occupiedMeanCo2Ppm - 1139.5)).toBeLessThanOrEqual(0.5);
      expect(Math.abs(a.seasons[s].generationLps - 0.148319)).toBeLessThanOrEqual(1e-6); // ideal gas correction of Table 4 (occupancy tests)
    }
  });

  it('case A curve passes 1342.4 ppm at 10:00 and peaks at 1375.7 ppm (worked example 1)', () => {
    const w = assessRoom(exampleOneRoom(155), ex1).seasons.winter;
    expect(Math.abs((w.curve.find((p) => p.minute === 600)?.co2Ppm ?? 0) - 1342.4)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(w.peakCo2Ppm - 1375.7)).toBeLessThanOrEqual(0.1);
  });

  it('case A meets the BB101 refurbishment mechanical criterion (1350 mean, 2000 for 20 min) and needs no retrofit', () => {
    const a = assessRoom(exampleOneRoom(155), ex1);
    expect(a.criterion.packId).toBe('bb101_2018_refurb_mechanical');
    expect(a.criteriaMet).toBe(true);
    // Appraised all the same (every assessed room is): the units would take over the 155 l/s fans.
    expect(a.appraisal?.replacesExistingLps).toBe(155);
  });

  it('case B, 40 L/s: mean 2773.6 ppm and 205.0 min above 2000 ppm, so it fails (checks 5 and 8)', () => {
    const w = assessRoom(exampleOneRoom(40), ex1).seasons.winter;
    expect(Math.abs(w.occupiedMeanCo2Ppm - 2773.6)).toBeLessThanOrEqual(0.5);
    expect(Math.abs(w.longestRunAboveMaxMinutes - 205.0)).toBeLessThanOrEqual(0.2);
    expect(w.criterionMet).toBe(false);
  });

  it('case B counts 26,580 pupil-hours a year above 1350 ppm and bands it far over its daily-mean limit', () => {
    // Hand derivation (Batterman 2017 §2.1; worked example 1): C_ss = 420 + 148319/40 = 4127.975 ppm, λ = 3.6·40/168 = 0.857143 h⁻¹;
    // L1 crosses 1350 ppm at t* = ln(3707.975/2777.975)/λ = 20.213 min; the break bottoms at ≈ 2874 ppm and
    // lunch at ≈ 1768 ppm, both above 1350, so the rest of the occupied day is above: 39.787 + 4·60 = 279.787 min.
    // Every season is identical here: 30 pupils × 279.787/60 h × 190 days = 26,579.7 pupil-hours (exposure).
    // Band (Airtally screening rule, common practice, no single source): mean 2,773.6 ppm ≥ 1.25 × 1,350 = 1,687.5 ppm.
    const a = assessRoom(exampleOneRoom(40), ex1);
    expect(a.risk.thresholdPpm).toBe(1350);
    expect(Math.abs(a.risk.pupilHoursPerYearAbove - 26579.7)).toBeLessThanOrEqual(1);
    expect(a.risk.band).toBe('far_over');
    expect(a.risk.reason).toBe(
      '30 pupils, 0 m² openable window and 40 l/s mechanical supply: winter mean 2,774 ppm, over 2,000 ppm for 205 minutes in a row; about 26,580 pupil-hours a year above 1,350 ppm.',
    );
  });

  it('case B: units take over the 40 l/s fans (no heat recovery) and supply the whole 160 l/s', () => {
    // Hand: required outdoor air 10^6·0.148319/(1350 − 420) = 159.48 L/s; the existing balanced fans recover no heat,
    // so the units replace them and supply it all: ceil(159.48) = 160 L/s. Cheapest ≥ 160 L/s in the default
    // catalogue: Ceiling cassette 100 + Sill unit 60 £7,300 (Wall 250 £7,500; Wall 150 + Sill 60 £8,300).
    const r = assessRoom(exampleOneRoom(40), ex1).appraisal;
    expect(r?.requiredSupplyLps).toBe(160);
    expect(r?.replacesExistingLps).toBe(40);
    expect(r?.capitalCostGbp).toBe(7300);
    expect(r?.unitModels).toBe('1 × Sill unit 60 + 1 × Ceiling cassette 100');
    // With 160 L/s the steady state is 420 + 148319/160 = 1347.0 ppm < 1350: no pupil-hours remain above.
    expect(Math.abs((r?.pupilHoursRemovedPerYear ?? 0) - 26579.7)).toBeLessThanOrEqual(1);
    // 26,579.7 pupil-hours / £7.3k = 3,641.1 per £1,000
    expect(Math.abs((r?.pupilHoursRemovedPer1000Gbp ?? 0) - 3641.1)).toBeLessThanOrEqual(0.5);
  });
});

describe('assessRoom on a typical classroom under the default set', () => {
  const a = assessRoom(typicalClassroom(), DEFAULT_ASSUMPTIONS);

  it('records the assumption version, the cautions and the defaults it used', () => {
    expect(a.assumptionsVersion).toBe(DEFAULT_ASSUMPTIONS.version);
    expect(a.cautions.join(' ')).toMatch(/not a design/);
    expect(a.assumed.some((d) => d.field === 'block.airPermeabilityM3hM2' && d.value === 20)).toBe(true);
    expect(a.airPermeabilityM3hM2).toBe(20); // system-built default
  });

  it('derives infiltration from the default permeability: 20 × 56 / 168 / 20 × 168 / 3.6 = 15.56 l/s (Kronvall–Persily rule, Sherman 1987)', () => {
    expect(Math.abs(a.seasons.winter.ventilation.infiltrationLps - 15.5556)).toBeLessThanOrEqual(0.001);
  });

  it('opens windows less in winter than in summer, so winter CO2 is worst', () => {
    expect(a.seasons.winter.ventilation.windowLps).toBeLessThan(a.seasons.summer.ventilation.windowLps);
    expect(a.worstSeason).toBe('winter');
  });

  it('is plain JSON', () => {
    expect(JSON.parse(JSON.stringify(a))).toEqual(a);
  });

  it('appraises the units against all three named baselines', () => {
    expect(a.appraisal?.feasible).toBe(true);
    expect(a.appraisal?.baselines.today.baseline).toBe('today');
    expect(a.appraisal?.baselines.same_air_without_recovery.baseline).toBe('same_air_without_recovery');
    expect(a.appraisal?.headline).toBe('same_air_without_recovery');
  });

  it('leaves curves out when asked, for batch runs', () => {
    const b = assessRoom(typicalClassroom(), DEFAULT_ASSUMPTIONS, { withCurve: false });
    expect(b.seasons.winter.curve).toEqual([]);
    expect(b.seasons.winter.occupiedMeanCo2Ppm).toBe(a.seasons.winter.occupiedMeanCo2Ppm);
  });

  it('uses EN 16798-1 Category II when the set chooses the European categories (EN 16798-1:2019 Annex B: 1220 ppm)', () => {
    const set = structuredClone(DEFAULT_ASSUMPTIONS);
    set.criteria.family.value = 'en16798_1';
    set.air.outdoorCo2Ppm.value = 420; // Annex B gives the limit as 800 ppm above 420 ppm outdoors
    const en = assessRoom(typicalClassroom(), set);
    expect(en.criterion.packId).toBe('en16798_cat_II');
    expect(en.criterion.meanLimitPpm).toBe(1220);
    expect(en.criterion.maxLimitPpm).toBeNull();
  });

  it('gives no retrofit for rooms that are not teaching rooms', () => {
    const office = typicalClassroom();
    office.room.use = 'office';
    expect(assessRoom(office, DEFAULT_ASSUMPTIONS).appraisal).toBeNull();
  });
});

describe('invalid input', () => {
  const cases: [string, (i: ReturnType<typeof typicalClassroom>) => void][] = [
    ['room.floorAreaM2', (i) => (i.room.floorAreaM2 = 0)],
    ['room.ceilingHeightM', (i) => (i.room.ceilingHeightM = Number.NaN)],
    ['room.pupils', (i) => (i.room.pupils = -1)],
    ['room.openableAreaM2', (i) => (i.room.openableAreaM2 = 1000)],
    ['room.use', (i) => ((i.room as { use: string }).use = 'ballroom')],
    ['room.orientationDeg', (i) => (i.room.orientationDeg = 400)],
    ['block.airPermeabilityM3hM2', (i) => (i.block.airPermeabilityM3hM2 = 0)],
    ['school.climateRegion', (i) => ((i.school as { climateRegion: string }).climateRegion = 'atlantis')],
    ['school.heatingEfficiency', (i) => (i.school.heatingEfficiency = 10)],
    // A gas boiler cannot have a COP: above 1 only heat pumps (limits.ts HEATING_EFFICIENCY_LIMITS).
    ['school.heatingEfficiency', (i) => (i.school.heatingEfficiency = 2.5)],
    ['room.pupils', (i) => (i.room.pupils = 27.5)],
    // 550 people in a 1 m² × 2 m room (2 m³) is more than two a square metre (limits.ts).
    [
      'room.pupils',
      (i) => {
        i.room.floorAreaM2 = 1;
        i.room.ceilingHeightM = 2;
        i.room.pupils = 500;
        i.room.adults = 50;
        i.room.glazingAreaM2 = 1;
        i.room.openableAreaM2 = 0.5;
      },
    ],
  ];
  for (const [field, spoil] of cases) {
    it(`rejects a bad ${field} with an EngineInputError naming it`, () => {
      const input = typicalClassroom();
      spoil(input);
      let error: unknown;
      try {
        assessRoom(input, DEFAULT_ASSUMPTIONS);
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(EngineInputError);
      expect((error as EngineInputError).field).toBe(field);
      expect((error as EngineInputError).message).toContain(field);
    });
  }
});
