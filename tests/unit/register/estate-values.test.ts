/**
 * The preview refuses the school and block values the estate's editors refuse (one declaration of each field's range,
 * src/lib/engine/limits.ts), so a commit never meets a database constraint the preview did not show.
 */
import { describe, expect, it } from 'vitest';
import { BLOCK_LIMITS, SCHOOL_LIMITS } from '~/lib/engine/limits';
import { BlockPatchSchema, SchoolPatchSchema } from '~/lib/server/estate/estate.schemas';
import type { EstateSnapshot } from '~/lib/server/register/plan';
import { plannerFor } from './plan-helper';

const FIELDS = [
  'school',
  'block',
  'code',
  'floorAreaM2',
  'airPermeabilityM3hM2',
  'schoolFuelPriceGbpPerKwh',
  'blockFuelPriceGbpPerKwh',
] as const;
const estate: EstateSnapshot = {
  schools: [{ id: 's1', name: 'Oak School', phase: 'primary', heatingFuel: 'gas' }],
  blocks: [{ id: 'b1', schoolId: 's1', name: 'Main', yearBuilt: 1968, airPermeabilityM3hM2: null }],
  rooms: [],
  defaultClimateRegion: 'midlands',
};
const plan = plannerFor(FIELDS, estate);
const errorColumns = (p: ReturnType<typeof plan>) =>
  p.problems.filter((x) => x.severity === 'error').map((x) => x.column);

describe('school and block values on import', () => {
  const permeability = BLOCK_LIMITS.airPermeabilityM3hM2.max + 1;
  const price = SCHOOL_LIMITS.fuelPriceGbpPerKwh.max + 1;

  it(`refuses an air permeability of ${permeability}, as the block editor does`, () => {
    expect(BlockPatchSchema.safeParse({ airPermeabilityM3hM2: permeability }).success).toBe(false);
    const p = plan([['Oak School', 'Main', 'G1', 55, permeability, null, null]]);
    expect(errorColumns(p)).toEqual(['airPermeabilityM3hM2']);
    expect(p.roomWrites).toHaveLength(0);
    expect(p.blockChanges).toEqual([]);
  });

  it(`refuses a school fuel price of £${price}/kWh, as the school editor does`, () => {
    expect(SchoolPatchSchema.safeParse({ fuelPriceGbpPerKwh: price }).success).toBe(false);
    const p = plan([['Oak School', 'Main', 'G1', 55, null, price, null]]);
    expect(errorColumns(p)).toEqual(['schoolFuelPriceGbpPerKwh']);
    expect(p.schoolChanges).toEqual([]);
  });

  it(`refuses a block fuel price of £${price}/kWh for a new block, which could not be created`, () => {
    const p = plan([['Oak School', 'Annexe', 'A1', 55, null, null, price]]);
    expect(errorColumns(p)).toEqual(['blockFuelPriceGbpPerKwh']);
    expect(p.newBlocks).toEqual([]);
  });

  it('accepts the same rows with values in range', () => {
    const p = plan([['Oak School', 'Annexe', 'A1', 55, 12, 0.07, 0.3]]);
    expect(errorColumns(p)).toEqual([]);
    expect(p.newBlocks).toEqual([
      expect.objectContaining({ name: 'Annexe', airPermeabilityM3hM2: 12, fuelPriceGbpPerKwh: 0.3 }),
    ]);
  });
});
