import { describe, expect, it } from 'vitest';
import { RoomPatchInputSchema, readTypedCells } from '~/lib/server/register/cell-edits';

// The words and units below are those the register import reads in a file (values.test.ts checks the readers);
// an edit typed into a cell must mean the same.
describe('edits typed into the register’s cells', () => {
  it('reads units and words as the import does', () => {
    expect(
      readTypedCells({
        floorAreaM2: '1.6 m2',
        ceilingHeightM: '2700 mm',
        orientationDeg: 'SW',
        winterWindowOpenFraction: '20 %',
        pupils: '28 pupils',
      }),
    ).toEqual({
      floorAreaM2: 1.6,
      ceilingHeightM: 2.7,
      orientationDeg: 225,
      winterWindowOpenFraction: 0.2,
      pupils: 28,
    });
  });

  it('passes plain numbers, codes and free text through unchanged', () => {
    expect(readTypedCells({ floorAreaM2: 55, use: 'classroom', name: 'Room 2 m2', notes: 'SW corner' })).toEqual({
      floorAreaM2: 55,
      use: 'classroom',
      name: 'Room 2 m2',
      notes: 'SW corner',
    });
  });

  it('reads a room use written as words', () => {
    expect(RoomPatchInputSchema.parse({ use: 'Science lab' })).toEqual({ use: 'science_lab' });
  });

  it('refuses what a file cell would refuse, saying which column and why', () => {
    expect(() => readTypedCells({ floorAreaM2: 'big' })).toThrow('Floor area (m2): "big" is not a number.');
    expect(() => readTypedCells({ floorAreaM2: '12 parsecs' })).toThrow(/"parsecs" is not a unit we can read here/);
  });
});
