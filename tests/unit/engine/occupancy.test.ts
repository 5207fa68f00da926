import { describe, expect, it } from 'vitest';
import { DEFAULT_ASSUMPTIONS } from '~/lib/engine/assumptions';
import { EngineInputError } from '~/lib/engine/errors';
import {
  GENERATION_TABLE_4,
  duBoisAreaM2,
  generationAtRoomLps,
  generationPerPersonLps,
  legacyGenerationLps,
  persilyGenerationLps,
} from '~/lib/engine/occupancy';
import table4 from './fixtures/persily-de-jonge-table-4.json';

describe('Persily & de Jonge (2017) Table 4', () => {
  for (const row of table4.rows) {
    it(`the paper's equation reproduces ${row.sex} ${row.ages} at every met level (${table4.source}; ±${table4.toleranceLps} L/s)`, () => {
      table4.mets.forEach((met, i) => {
        const eq = persilyGenerationLps({ rq: 0.85, bmrMjPerDay: row.bmrMjPerDay, met, tempK: 273, pressureKpa: 101 });
        expect(Math.abs(eq - (row.lps[i] as number))).toBeLessThanOrEqual(table4.toleranceLps);
      });
    });
  }

  it('ships the school age bands of the table unchanged in the engine', () => {
    const byKey = new Map(table4.rows.map((r) => [`${r.ages}|${r.sex}`, r.lps]));
    for (const row of GENERATION_TABLE_4) {
      expect([...row.lpsByMet]).toEqual(byKey.get(`${row.ages}|${row.sex}`));
    }
  });

  it('gives the mixed-sex rate 0.00445 L/s for 11–<16 y at 1.4 met (Persily & de Jonge 2017, Table 4)', () => {
    expect(generationPerPersonLps(GENERATION_TABLE_4, 'secondary', 1.4)).toBeCloseTo(0.00445, 12);
  });

  it('gives the mixed-sex means of Persily & de Jonge (2017) Table 4 for primary, secondary and staff', () => {
    // Mean of the male and female rows of Table 4 (Indoor Air 27(5):868–879): primary 0.00285/0.00335/0.00385/0.0048, secondary 0.0038/0.00445/0.00505/0.0063,
    // staff 30–<40 0.00405/0.0047/0.0054/0.00675 at 1.2/1.4/1.6/2.0 met.
    const expected = {
      primary: [0.00285, 0.00335, 0.00385, 0.0048],
      secondary: [0.0038, 0.00445, 0.00505, 0.0063],
      adult: [0.00405, 0.0047, 0.0054, 0.00675],
    } as const;
    for (const [group, values] of Object.entries(expected)) {
      [1.2, 1.4, 1.6, 2.0].forEach((met, i) => {
        expect(generationPerPersonLps(GENERATION_TABLE_4, group as 'primary', met)).toBeCloseTo(
          values[i] as number,
          12,
        );
      });
    }
  });

  it('interpolates linearly in met between columns (Persily & de Jonge 2017: generation is proportional to met)', () => {
    // Hand: secondary 1.3 met = (0.0038 + 0.00445)/2 = 0.004125 L/s.
    expect(generationPerPersonLps(GENERATION_TABLE_4, 'secondary', 1.3)).toBeCloseTo(0.004125, 12);
  });

  it('rejects a met level outside the table', () => {
    expect(() => generationPerPersonLps(GENERATION_TABLE_4, 'secondary', 5)).toThrow(EngineInputError);
  });
});

describe('generation equations and gas temperature', () => {
  it('Persily equation: RQ 0.85, BMR 7.83 MJ/d, 1.2 met, 273 K, 101 kPa → 0.004555 L/s (Persily & de Jonge 2017 equation; table 0.0046)', () => {
    expect(
      Math.abs(
        persilyGenerationLps({ rq: 0.85, bmrMjPerDay: 7.83, met: 1.2, tempK: 273, pressureKpa: 101 }) - 0.004555,
      ),
    ).toBeLessThanOrEqual(2e-6);
  });

  it('legacy body-surface formula: RQ 0.83, A_D 1.8 m², 1.2 met → 0.005149 L/s (ASHRAE Handbook—Fundamentals form with the DuBois area)', () => {
    expect(Math.abs(legacyGenerationLps({ rq: 0.83, bodySurfaceM2: 1.8, met: 1.2 }) - 0.005149)).toBeLessThanOrEqual(
      2e-6,
    );
  });

  it('DuBois area of a 70 kg, 1.75 m adult is 1.844 m² (DuBois & DuBois 1916 formula; hand derivation)', () => {
    // 70^0.425 = e^(0.425·4.248495) = e^1.805610 = 6.0834; 1.75^0.725 = e^(0.725·0.559616) = e^0.405722 = 1.50035;
    // 0.202·6.0834·1.50035 = 1.8437 m²
    expect(Math.abs(duBoisAreaM2(70, 1.75) - 1.8437)).toBeLessThanOrEqual(0.001);
  });

  it('corrects 0.1382 L/s at 0 °C to 0.148319 L/s at 20 °C and 101.325 kPa (ideal gas law: V ∝ T at constant pressure)', () => {
    expect(
      Math.abs(generationAtRoomLps({ tableLps: 0.1382, roomTempC: 20, pressureKpa: 101.325 }) - 0.148319),
    ).toBeLessThanOrEqual(1e-6);
  });

  it('example 1 occupancy gives G = 0.1382 L/s at 0 °C: 30·0.00445 + 0.0047 (worked example 1, docs/sources.md)', () => {
    const g =
      30 * generationPerPersonLps(DEFAULT_ASSUMPTIONS.occupancy.generationTable.value, 'secondary', 1.4) +
      generationPerPersonLps(GENERATION_TABLE_4, 'adult', 1.4);
    expect(g).toBeCloseTo(0.1382, 10);
  });
});
