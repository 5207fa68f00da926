/** Unknown stays unknown on import: blank and placeholder cells never become 0, and re-importing keeps stored values. */
import { describe, expect, it } from 'vitest';
import type { EstateSnapshot } from '~/lib/server/register/plan';
import { plannerFor } from './plan-helper';
import type { RoomFields } from '~/lib/server/estate/estate.schemas';

const FIELDS = ['school', 'code', 'floorAreaM2', 'pupils', 'glazingAreaM2', 'openableAreaM2'] as const;
const stored: RoomFields = {
  code: 'G1',
  name: 'Year 1',
  use: 'classroom',
  floorAreaM2: 55,
  ceilingHeightM: 2.7,
  pupils: 30,
  adults: 1,
  ageGroup: 'primary',
  orientationDeg: null,
  glazingAreaM2: 10,
  openableAreaM2: 2,
  windowType: null,
  frameMaterial: null,
  glazingGValue: null,
  ventilationType: 'natural_single_sided',
  mechanicalSupplyLps: null,
  winterWindowOpenFraction: null,
  notes: null,
};
const estate: EstateSnapshot = {
  schools: [{ id: 's1', name: 'Oak School', phase: 'primary' }],
  blocks: [],
  rooms: [{ id: 'r1', schoolId: 's1', blockId: null, fields: stored }],
  defaultClimateRegion: 'midlands',
};

const planner = plannerFor(FIELDS, estate);
const plan = (cells: (string | number | null)[][], clearBlanks = false) => planner(cells, { clearBlanks });

describe('blank and placeholder cells', () => {
  it('keep the stored value of an existing room on re-import (TBC and blank alike)', () => {
    const p = plan([['Oak School', 'G1', 55, 'TBC', null, 2]]);
    expect(p.roomWrites).toHaveLength(0);
    expect(p.summary.roomsUnchanged).toBe(1);
  });

  it('clear the stored value only when the person chose to clear blanks, and the preview says from what to what', () => {
    const p = plan([['Oak School', 'G1', 55, null, 10, 2]], true);
    expect(p.roomWrites[0]?.fields.pupils).toBeNull();
    expect(p.roomChanges).toEqual([
      {
        row: 2,
        school: 'Oak School',
        code: 'G1',
        kind: 'changed',
        fields: [{ field: 'pupils', before: 30, after: null }],
      },
    ]);
  });

  it('make a new room unknown, never 0, for pupils, glazing and openable area', () => {
    const p = plan([['Oak School', 'N7', 60, 'n/a', null, '']]);
    const fields = p.roomWrites[0]?.fields;
    expect(fields).toMatchObject({ pupils: null, glazingAreaM2: null, openableAreaM2: null, ventilationType: null });
    expect(p.roomChanges[0]).toMatchObject({ code: 'N7', kind: 'new' });
  });

  it('show changed values from what to what', () => {
    const p = plan([['Oak School', 'G1', 55, 28, 10, 2.5]]);
    expect(p.roomChanges[0]?.fields).toEqual([
      { field: 'pupils', before: 30, after: 28 },
      { field: 'openableAreaM2', before: 2, after: 2.5 },
    ]);
  });
});
