/** Properties that must hold for any valid input (fast-check). */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { discountedPaybackYears, npvLevel } from '~/lib/engine/finance';
import { assessRoom, DEFAULT_ASSUMPTIONS, EngineInputError } from '~/lib/engine/index';
import type { RoomAssessment, RoomAssessmentInput } from '~/lib/engine/types';
import {
  AGE_GROUPS,
  CLIMATE_REGIONS,
  CONSTRUCTION_TYPES,
  HEATING_FUELS,
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
  FRAME_MATERIALS,
} from '~/lib/engine/vocabulary';

const num = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });

/** An efficiency that fits the fuel (limits.ts): boilers 0.3–1, direct electric 1, heat pumps a seasonal COP 1–6. */
const efficiencyFor = (fuel: string, x: number) =>
  fuel === 'electric' ? 1 : fuel === 'heat_pump' ? 1 + 5 * x : 0.3 + 0.7 * x;

const inputArb: fc.Arbitrary<RoomAssessmentInput> = fc
  .record({
    room: fc.record({
      code: fc.string({ maxLength: 8 }),
      name: fc.string({ maxLength: 16 }),
      use: fc.option(fc.constantFrom(...ROOM_USES)),
      floorAreaM2: num(50, 400),
      ceilingHeightM: fc.option(num(2.2, 8)),
      pupils: fc.option(fc.integer({ min: 0, max: 90 })),
      adults: fc.option(fc.integer({ min: 0, max: 4 })),
      ageGroup: fc.option(fc.constantFrom(...AGE_GROUPS)),
      orientationDeg: fc.option(fc.integer({ min: 0, max: 359 })),
      glazingAreaM2: fc.option(num(0, 30)),
      openableAreaM2: fc.option(num(0, 1)),
      windowType: fc.option(fc.constantFrom(...WINDOW_TYPES)),
      frameMaterial: fc.option(fc.constantFrom(...FRAME_MATERIALS)),
      glazingGValue: fc.option(num(0.1, 0.85)),
      ventilationType: fc.option(fc.constantFrom(...VENTILATION_TYPES)),
      mechanicalSupplyLps: fc.option(num(0, 1000)),
      winterWindowOpenFraction: fc.option(num(0, 1)),
    }),
    block: fc.record({
      yearBuilt: fc.option(fc.integer({ min: 1850, max: 2030 })),
      constructionType: fc.option(fc.constantFrom(...CONSTRUCTION_TYPES)),
      airPermeabilityM3hM2: fc.option(num(0.5, 40)),
      heatingFuel: fc.option(fc.constantFrom(...HEATING_FUELS)),
      fuelPriceGbpPerKwh: fc.option(num(0.01, 0.6)),
      heatingEfficiency: fc.option(num(0, 1)),
      heatingInstalledYear: fc.option(fc.integer({ min: 1950, max: 2030 })),
    }),
    school: fc.record({
      phase: fc.constantFrom(...SCHOOL_PHASES),
      climateRegion: fc.constantFrom(...CLIMATE_REGIONS),
      heatingFuel: fc.constantFrom(...HEATING_FUELS),
      fuelPriceGbpPerKwh: fc.option(num(0.01, 0.6)),
      heatingEfficiency: fc.option(num(0, 1)),
      timetable: fc.constant(null),
    }),
  })
  .map((generated) => {
    // A fresh copy (the shrinker reuses generated values): openable area as a share of the glazing (or of the
    // assumed glazing), efficiencies that fit their fuel.
    const input = structuredClone(generated) as RoomAssessmentInput;
    const r = input.room;
    if (r.openableAreaM2 !== null) r.openableAreaM2 *= r.glazingAreaM2 ?? 0.2 * r.floorAreaM2;
    const s = input.school;
    if (s.heatingEfficiency !== null) s.heatingEfficiency = efficiencyFor(s.heatingFuel, s.heatingEfficiency);
    const b = input.block;
    if (b.heatingEfficiency !== null)
      b.heatingEfficiency = efficiencyFor(b.heatingFuel ?? s.heatingFuel, b.heatingEfficiency);
    return input;
  });

const SEASONS = ['winter', 'mid', 'summer'] as const;
const run = (input: RoomAssessmentInput) => assessRoom(input, DEFAULT_ASSUMPTIONS, { withCurve: false });
const notAbove = (a: number, b: number) => a <= b + 1e-9 * Math.max(1, Math.abs(b));

function everyNumberFinite(value: unknown, path: string, bad: string[]): void {
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) bad.push(`${path}=${value}`);
  } else if (Array.isArray(value)) {
    for (const [i, v] of value.entries()) everyNumberFinite(v, `${path}[${i}]`, bad);
  } else if (value && typeof value === 'object')
    for (const [k, v] of Object.entries(value)) everyNumberFinite(v, `${path}.${k}`, bad);
}

const RUNS = { numRuns: 150, seed: 4242 };

describe('engine properties', () => {
  it('more pupils never lowers CO2, even where the fan supply is not recorded (its default is per m², not per pupil)', () => {
    fc.assert(
      fc.property(inputArb, fc.integer({ min: 1, max: 30 }), (input, extra) => {
        const a = run(input);
        const more = structuredClone(input);
        // Within the densest a room can be (limits.ts: one person a 0.5 m²).
        more.room.pupils = Math.min(
          a.pupils + extra,
          Math.floor(input.room.floorAreaM2 / 0.5) - a.occupants + a.pupils,
        );
        const b = run(more);
        for (const s of SEASONS) {
          expect(notAbove(a.seasons[s].occupiedMeanCo2Ppm, b.seasons[s].occupiedMeanCo2Ppm)).toBe(true);
          expect(notAbove(a.seasons[s].peakCo2Ppm, b.seasons[s].peakCo2Ppm)).toBe(true);
        }
      }),
      RUNS,
    );
  });

  it('more airflow (window area, leakage or fan supply) never raises CO2', () => {
    fc.assert(
      fc.property(inputArb, num(0, 5), num(0, 10), num(0, 500), (input, moreWindow, moreLeak, moreFan) => {
        const more = structuredClone(input);
        const glazing = input.room.glazingAreaM2 ?? 0.2 * input.room.floorAreaM2;
        more.room.openableAreaM2 = Math.min((input.room.openableAreaM2 ?? 0.25 * glazing) + moreWindow, glazing);
        more.block.airPermeabilityM3hM2 = Math.min(
          (input.block.airPermeabilityM3hM2 ?? run(input).airPermeabilityM3hM2) + moreLeak,
          50,
        );
        const fan = input.room.mechanicalSupplyLps;
        if (fan !== null) more.room.mechanicalSupplyLps = Math.min(fan + moreFan, 5000);
        const a = run(input);
        const b = run(more);
        for (const s of SEASONS) {
          expect(notAbove(b.seasons[s].occupiedMeanCo2Ppm, a.seasons[s].occupiedMeanCo2Ppm)).toBe(true);
          expect(notAbove(b.seasons[s].peakCo2Ppm, a.seasons[s].peakCo2Ppm)).toBe(true);
        }
      }),
      RUNS,
    );
  });

  it('every output is finite and the result is plain JSON, for any valid input', () => {
    fc.assert(
      fc.property(inputArb, (input) => {
        const a: RoomAssessment = assessRoom(input, DEFAULT_ASSUMPTIONS);
        const bad: string[] = [];
        everyNumberFinite(a, 'result', bad);
        expect(bad).toEqual([]);
        expect(JSON.parse(JSON.stringify(a))).toEqual(a);
        expect(a.risk.score).toBeGreaterThanOrEqual(0);
        expect(a.risk.score).toBeLessThan(1);
      }),
      RUNS,
    );
  });

  it('NPV ≥ 0 exactly when the discounted payback is within the appraisal period (finance functions)', () => {
    // Money in whole pence and rates in hundredths of a percent, as a finance lead would enter them.
    const pence = (max: number) => fc.integer({ min: -max, max }).map((p) => p / 100);
    fc.assert(
      fc.property(
        pence(10_000_000).map(Math.abs),
        pence(1_000_000),
        fc.integer({ min: 0, max: 2000 }).map((bp) => bp / 10000),
        fc.integer({ min: 1, max: 60 }),
        (capital, saving, rate, years) => {
          const npv = npvLevel({ capitalGbp: capital, annualSavingGbp: saving, rate, years });
          const dpb = discountedPaybackYears({ capitalGbp: capital, annualSavingGbp: saving, rate });
          expect(npv >= 0).toBe(dpb !== null && dpb <= years);
        },
      ),
      { numRuns: 2000, seed: 7 },
    );
  });

  it('NPV and discounted payback agree for every baseline of every appraisal the engine makes', () => {
    const years = DEFAULT_ASSUMPTIONS.finance.appraisalYears.value;
    fc.assert(
      fc.property(inputArb, (input) => {
        const r = run(input).appraisal;
        if (!r?.feasible) return;
        for (const m of [r.baselines.today, r.baselines.same_air_without_recovery, r.baselines.simpler_option]) {
          if (!m) continue;
          expect(m.npvGbp >= -1e-6).toBe(m.discountedPaybackYears !== null && m.discountedPaybackYears <= years + 1e-9);
          expect(m.annualNetSavingGbp).toBeCloseTo(m.annual.heatingGbp + m.annual.fanGbp + m.annual.maintenanceGbp, 6);
        }
      }),
      RUNS,
    );
  });

  it('rejects an invalid value with an EngineInputError naming the field', () => {
    const spoilers: [string, (i: RoomAssessmentInput, x: number) => void][] = [
      ['room.floorAreaM2', (i, x) => (i.room.floorAreaM2 = -x)],
      ['room.ceilingHeightM', (i, x) => (i.room.ceilingHeightM = 20 + x)],
      ['room.pupils', (i, x) => (i.room.pupils = -1 - x)],
      ['room.adults', (i, x) => (i.room.adults = 60 + x)],
      ['room.glazingAreaM2', (i, x) => (i.room.glazingAreaM2 = -0.1 - x)],
      [
        'room.openableAreaM2',
        (i, x) => (i.room.openableAreaM2 = (i.room.glazingAreaM2 ?? 3 * i.room.floorAreaM2) + 1 + x),
      ],
      ['room.glazingGValue', (i, x) => (i.room.glazingGValue = 1 + x)],
      ['room.mechanicalSupplyLps', (i, x) => (i.room.mechanicalSupplyLps = -1 - x)],
      ['block.yearBuilt', (i, x) => (i.block.yearBuilt = 1000 - x)],
      ['block.airPermeabilityM3hM2', (i, x) => (i.block.airPermeabilityM3hM2 = 60 + x)],
      ['school.fuelPriceGbpPerKwh', (i, x) => (i.school.fuelPriceGbpPerKwh = -0.01 - x)],
      ['school.heatingEfficiency', (i, x) => (i.school.heatingEfficiency = 0.1 / (1 + x))],
      ['room.floorAreaM2', (i) => (i.room.floorAreaM2 = Number.NaN)],
    ];
    fc.assert(
      fc.property(inputArb, fc.integer({ min: 0, max: spoilers.length - 1 }), num(0, 1000), (input, which, x) => {
        const [field, spoil] = spoilers[which] as (typeof spoilers)[number];
        const spoiled = structuredClone(input);
        spoil(spoiled, x);
        let error: unknown = null;
        try {
          run(spoiled);
        } catch (e) {
          error = e;
        }
        expect(error).toBeInstanceOf(EngineInputError);
        expect((error as EngineInputError).field).toBe(field);
      }),
      RUNS,
    );
  });
});
