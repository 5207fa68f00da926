/** Adding a school and editing it accept the same values: the two forms share one declaration of each field. */
import { describe, expect, it } from 'vitest';
import { SchoolCreateSchema, SchoolPatchSchema } from '~/lib/server/estate/estate.schemas';

const school = { name: 'Oak School', phase: 'primary', climateRegion: 'midlands' } as const;

describe('school fields', () => {
  it('accept on edit the 45-character reference number that adding the school accepts', () => {
    const referenceNumber = 'BV-'.padEnd(45, '7');
    expect(SchoolCreateSchema.safeParse({ ...school, referenceNumber }).success).toBe(true);
    expect(SchoolPatchSchema.safeParse({ referenceNumber }).success).toBe(true);
  });

  it('refuse on both a reference number longer than 50 characters', () => {
    const referenceNumber = 'BV-'.padEnd(51, '7');
    expect(SchoolCreateSchema.safeParse({ ...school, referenceNumber }).success).toBe(false);
    expect(SchoolPatchSchema.safeParse({ referenceNumber }).success).toBe(false);
  });
});

describe('blank school fields', () => {
  it('store no reference number or address, never an empty text (reference numbers are unique in a trust)', () => {
    expect(SchoolPatchSchema.parse({ referenceNumber: '  ', address: '' })).toEqual({
      referenceNumber: null,
      address: null,
    });
  });
});
