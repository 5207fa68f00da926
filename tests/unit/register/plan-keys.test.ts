/**
 * What the import matches by school: room codes are unique within a school (not across the trust), blocks are the
 * school's own, and the rooms a file leaves out are those of the schools it names. The planner keys these by school
 * then name or code; these cases hold it to that.
 */
import { describe, expect, it } from 'vitest';
import type { RoomFields } from '~/lib/server/estate/estate.schemas';
import type { EstateSnapshot } from '~/lib/server/register/plan';
import { plannerFor } from './plan-helper';

const FIELDS = ['school', 'block', 'code', 'floorAreaM2', 'airPermeabilityM3hM2'] as const;
const room = (code: string): RoomFields => ({
  code,
  name: '',
  use: 'classroom',
  floorAreaM2: 55,
  ceilingHeightM: null,
  pupils: null,
  adults: null,
  ageGroup: null,
  orientationDeg: null,
  glazingAreaM2: null,
  openableAreaM2: null,
  windowType: null,
  frameMaterial: null,
  glazingGValue: null,
  ventilationType: null,
  mechanicalSupplyLps: null,
  winterWindowOpenFraction: null,
  notes: null,
});
const estate: EstateSnapshot = {
  schools: [
    { id: 'oak', name: 'Oak School', phase: 'primary' },
    { id: 'elm', name: 'Elm School', phase: 'primary' },
  ],
  blocks: [{ id: 'oak-main', schoolId: 'oak', name: 'Main', yearBuilt: 1968, airPermeabilityM3hM2: null }],
  rooms: [
    { id: 'oak-g1', schoolId: 'oak', blockId: 'oak-main', fields: room('G1') },
    { id: 'oak-g2', schoolId: 'oak', blockId: 'oak-main', fields: room('G2') },
    { id: 'elm-g1', schoolId: 'elm', blockId: null, fields: room('G1') },
    { id: 'elm-g3', schoolId: 'elm', blockId: null, fields: room('G3') },
  ],
  defaultClimateRegion: 'midlands',
};
const plan = plannerFor(FIELDS, estate);
const errors = (p: ReturnType<typeof plan>) =>
  p.problems.filter((x) => x.severity === 'error').map((x) => `${x.row} ${x.column}: ${x.message}`);

describe('keys by school on import', () => {
  it('takes one code in two schools as two rooms, and refuses it twice in one school', () => {
    const p = plan([
      ['Oak School', 'Main', 'T1', 60, null],
      ['Elm School', null, 'T1', 60, null],
      ['Ash School', null, 'T1', 60, null],
      ['oak  school', 'Main', 'T1', 61, null],
    ]);
    expect(p.roomWrites.map((w) => w.rowNumber)).toEqual([2, 3, 4]);
    expect(errors(p)).toEqual([
      '5 code: Room code "T1" appears again for oak school (first on row 2); room codes must be unique within a school.',
    ]);
  });

  it('matches a row to the room of its own school, not to a room of another school with the same code', () => {
    const p = plan([
      ['Elm School', null, 'G1', 70, null],
      ['Elm School', null, 'G3', 55, null],
    ]);
    expect(p.roomWrites).toEqual([expect.objectContaining({ roomId: 'elm-g1', after: { floorAreaM2: 70 } })]);
    expect(p.summary.roomsUnchanged).toBe(1);
  });

  it('lists as missing only the rooms of the schools the file names that it leaves out', () => {
    const p = plan([['Elm School', null, 'G3', 55, null]]);
    expect(p.missingRooms.map((r) => r.id)).toEqual(['elm-g1']);
    const both = plan([
      ['Oak School', 'Main', 'G1', 55, null],
      ['Elm School', null, 'G3', 55, null],
    ]);
    expect(both.missingRooms.map((r) => r.id).sort()).toEqual(['elm-g1', 'oak-g2']);
  });

  it("finds a school's own block whatever its case, and creates a block of that name in another school", () => {
    const p = plan([
      ['Oak School', 'MAIN', 'N0', 55, 9],
      ['Elm School', 'Main', 'N1', 55, 7],
      ['Elm School', ' main ', 'N2', 55, null],
    ]);
    expect(p.newBlocks.map((b) => ({ school: b.school, name: b.name }))).toEqual([
      { school: { id: 'elm' }, name: 'Main' },
    ]);
    expect(p.roomWrites.map((w) => w.block)).toEqual([
      { id: 'oak-main' },
      expect.objectContaining({ newKey: expect.any(String) }),
      expect.objectContaining({ newKey: expect.any(String) }),
    ]);
    expect(p.roomWrites[1]?.block).toEqual(p.roomWrites[2]?.block);
    expect(p.blockChanges).toEqual([
      { id: 'oak-main', name: 'Main', before: { airPermeabilityM3hM2: null }, after: { airPermeabilityM3hM2: 9 } },
    ]);
  });

  it('refuses a school or block value on every row that carries it, whether typed as a number or as text', () => {
    const p = plan([
      ['Oak School', 'Main', 'G1', 55, 9999],
      ['Oak School', 'Main', 'G2', 55, '9999'],
      ['Elm School', 'East', 'N1', 55, 9999],
    ]);
    expect(errors(p).map((e) => e.split(':')[0])).toEqual([
      '2 airPermeabilityM3hM2',
      '3 airPermeabilityM3hM2',
      '4 airPermeabilityM3hM2',
    ]);
    expect(p.roomWrites).toEqual([]);
  });
});
