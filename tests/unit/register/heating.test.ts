/**
 * The import and the school and block editors apply one rule to heating: an efficiency must fit the fuel it is for
 * (src/lib/engine/limits.ts, HEATING_EFFICIENCY_LIMITS): boilers 0.3–1, direct electric exactly 1, heat pumps 1–6.
 * A block without a fuel of its own burns its school's.
 */
import { describe, expect, it } from 'vitest';
import type { EstateSnapshot } from '~/lib/server/register/plan';
import { plannerFor } from './plan-helper';

const FIELDS = [
  'school',
  'block',
  'code',
  'floorAreaM2',
  'schoolHeatingFuel',
  'schoolHeatingEfficiency',
  'blockHeatingFuel',
  'blockHeatingEfficiency',
] as const;
const estate: EstateSnapshot = {
  schools: [
    {
      id: 's1',
      name: 'Oak School',
      phase: 'primary',
      heatingFuel: 'gas',
      fuelPriceGbpPerKwh: null,
      heatingEfficiency: 0.85,
    },
  ],
  blocks: [
    {
      id: 'b1',
      schoolId: 's1',
      name: 'Main',
      yearBuilt: 1968,
      airPermeabilityM3hM2: null,
      heatingFuel: null,
      fuelPriceGbpPerKwh: null,
      heatingEfficiency: null,
    },
  ],
  rooms: [],
  defaultClimateRegion: 'midlands',
};

const plan = plannerFor(FIELDS, estate);
const errorsOf = (p: ReturnType<typeof plan>) => p.problems.filter((x) => x.severity === 'error');

describe('heating efficiency on import', () => {
  it('refuses a block efficiency of 3 under a gas school, as the block editor does', () => {
    const p = plan([['Oak School', 'Main', 'G1', 55, null, null, null, 3]]);
    expect(errorsOf(p)).toEqual([
      expect.objectContaining({ row: 2, column: 'blockHeatingEfficiency', message: expect.stringMatching(/gas/) }),
    ]);
    expect(p.roomWrites).toHaveLength(0);
    expect(p.blockChanges).toEqual([]);
  });

  it('refuses a school efficiency of 3 for gas heating, as the school editor does', () => {
    const p = plan([['Oak School', 'Main', 'G1', 55, 'gas', 3, null, null]]);
    expect(errorsOf(p).map((e) => e.column)).toEqual(['schoolHeatingEfficiency']);
    expect(p.schoolChanges).toEqual([]);
  });

  it('refuses switching a school to direct electric while its stored efficiency stays 0.85', () => {
    const p = plan([['Oak School', 'Main', 'G1', 55, 'electric', null, null, null]]);
    expect(errorsOf(p).map((e) => e.column)).toEqual(['schoolHeatingFuel']);
    expect(p.schoolChanges).toEqual([]);
  });

  it('accepts a heat pump block with a seasonal COP of 3 in a gas school', () => {
    const p = plan([['Oak School', 'Main', 'G1', 55, null, null, 'heat_pump', 3]]);
    expect(errorsOf(p)).toEqual([]);
    expect(p.blockChanges).toEqual([
      {
        id: 'b1',
        name: 'Main',
        before: { heatingFuel: null, heatingEfficiency: null },
        after: { heatingFuel: 'heat_pump', heatingEfficiency: 3 },
      },
    ]);
  });

  it('keeps the rows of the school that carry no heating when another row carries a wrong efficiency', () => {
    const p = plan([
      ['Oak School', 'Main', 'G1', 55, null, null, null, null],
      ['Oak School', 'Main', 'G2', 55, 'gas', 3, null, null],
    ]);
    expect(p.roomWrites.map((w) => w.fields.code)).toEqual(['G1']);
    expect(p.summary.rowsRejected).toBe(1);
  });
});
