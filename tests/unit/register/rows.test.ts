import { describe, expect, it } from 'vitest';
import { detectHeader } from '../../../src/lib/server/register/headers';
import { classifyRow, compileColumns, parseRow } from '../../../src/lib/server/register/rows';

// A header of our template's names, with the room code as the last mapped column, so a row's kind can only be told
// after its code is read.
const HEADER = ['School', 'Block', 'Room name', 'Floor area (m2)', 'Pupils', 'Room code', 'Survey ref'];
const header = detectHeader([HEADER]);
if (!header) throw new Error('the test header was not recognised');
const columns = compileColumns(header.columns);

describe('telling rooms from total lines, notes and blanks', () => {
  it('reads the room code even when two different texts come before it', () => {
    expect(classifyRow(['Oak Lane Primary', 'Main', 'Classroom 1', 52, 30, 'G12', null], columns)).toBe('room');
    // A room named with a total word is still a room: it has a code.
    expect(classifyRow(['Oak Lane Primary', 'Main', 'Totals store', 12, 0, 'G13', null], columns)).toBe('room');
    expect(classifyRow(['Oak Lane Primary', 'Main', '', 311, 180, 'Subtotal', null], columns)).toBe('subtotal');
    expect(classifyRow(['Oak Lane Primary', 'Main', '', 311, 180, 'Grand total', null], columns)).toBe('subtotal');
  });

  it('takes a row without a code that says "Total" in any cell, mapped or not, for a total line', () => {
    expect(classifyRow(['', '', '', 311, 180, '', 'Total'], columns)).toBe('subtotal');
    expect(classifyRow(['Totals', '', '', 311, 180, null, null], columns)).toBe('subtotal');
  });

  it('skips a row of one text as a note, unless that text is a code in the code column', () => {
    expect(classifyRow(['Ground floor', null, null, null, null, null, null], columns)).toBe('note');
    expect(classifyRow([null, null, null, null, null, 'G12', null], columns)).toBe('room');
    expect(classifyRow([null, null, null, null, null, 'Rooms surveyed in May', null], columns)).toBe('note');
    expect(classifyRow([null, ' ', '\u00a0', null, null, '', null], columns)).toBe('blank');
  });
});

describe('reading a room row', () => {
  it('gives every mapped field: null for a blank cell, undefined with an error for one it cannot read', () => {
    const row = parseRow(7, ['Oak Lane Primary', '', 'Classroom 1', 'about fifty', 30, 'G12', 'S-1'], columns);
    expect(Object.keys(row.values).sort()).toEqual(['block', 'code', 'floorAreaM2', 'name', 'pupils', 'school']);
    expect(row.values).toMatchObject({ school: 'Oak Lane Primary', block: null, name: 'Classroom 1', pupils: 30 });
    expect(row.values.floorAreaM2).toBeUndefined();
    expect(row.problems).toMatchObject([{ row: 7, columnLetter: 'D', severity: 'error', value: 'about fifty' }]);
  });

  it('keeps each row’s values apart (no row shares or changes another’s)', () => {
    const first = parseRow(2, ['Oak Lane Primary', 'Main', 'Classroom 1', 52, 30, 'G12', null], columns);
    const second = parseRow(3, ['Elm Park School', 'North', 'Lab 2', 61.5, 28, 'N4', null], columns);
    expect(first.values).toMatchObject({ school: 'Oak Lane Primary', floorAreaM2: 52, code: 'G12' });
    expect(second.values).toMatchObject({ school: 'Elm Park School', floorAreaM2: 61.5, code: 'N4' });
  });
});
