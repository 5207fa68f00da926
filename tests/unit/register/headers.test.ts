import { describe, expect, it } from 'vitest';
import {
  columnLetter,
  detectHeader,
  headerKey,
  headerScale,
  matchHeader,
} from '../../../src/lib/server/register/headers';
import { REGISTER_COLUMNS } from '../../../src/lib/server/register/columns';

describe('matching headers', () => {
  it('matches every template header to its own field', () => {
    for (const c of REGISTER_COLUMNS) expect(matchHeader(c.header)).toBe(c.field);
  });
  it.each([
    ['FLOOR AREA (m²)', 'floorAreaM2'],
    ['Floor area m²', 'floorAreaM2'],
    ['GIA (sqm)', 'floorAreaM2'],
    ['Area', 'floorAreaM2'],
    ['  room   no. ', 'code'],
    ['Room Ref', 'code'],
    [`${'ceiling ht'.replace('ht', 'height')} [mm]`, 'ceilingHeightM'],
    ['Openable window area (m2)', 'openableAreaM2'],
    ['Vent. type', 'ventilationType'],
    ['Air permeability (m3/h.m2 @ 50Pa)', 'airPermeabilityM3hM2'],
    ['No. of pupils', 'pupils'],
    ['Site', 'school'],
    ['Building', 'block'],
  ])('matches %j to %s', (header, field) => {
    expect(matchHeader(header)).toBe(field);
  });
  it('leaves unknown headers unmatched unless the trust mapped them before', () => {
    expect(matchHeader('Survey ref 2019')).toBeNull();
    expect(matchHeader('Survey ref 2019', new Map([[headerKey('Survey ref 2019'), 'code']]))).toBe('code');
  });
  it('reads the unit in the header as a scale', () => {
    expect(headerScale('Ceiling height (mm)', 'ceilingHeightM')).toBe(0.001);
    expect(headerScale('Floor area (sq ft)', 'floorAreaM2')).toBeCloseTo(0.09290304, 9);
    expect(headerScale('Floor area (m2)', 'floorAreaM2')).toBe(1);
    // 1 m³/h = 1,000 l ÷ 3,600 s = 1/3.6 l/s (SI), written with the superscript as spreadsheets do.
    expect(headerScale('Mechanical supply (m³/h)', 'mechanicalSupplyLps')).toBeCloseTo(1 / 3.6, 12);
    expect(headerScale('Mechanical supply (m3/h)', 'mechanicalSupplyLps')).toBeCloseTo(1 / 3.6, 12);
  });
  it('names columns as spreadsheets do', () => {
    expect([0, 25, 26, 27, 701].map(columnLetter)).toEqual(['A', 'Z', 'AA', 'AB', 'ZZ']);
  });
});

describe('finding the header row', () => {
  it('skips title rows above the header', () => {
    const rows = [
      ['Brackenmoor room survey 2026'],
      [],
      ['School', 'Room code', 'Room name', 'Floor area (m2)', 'Pupils'],
      ['A', 'G1', 'x', 50, 30],
    ];
    const header = detectHeader(rows);
    expect(header?.row).toBe(3);
    expect(header?.rowCount).toBe(1);
    expect(header?.confident).toBe(true);
  });
  it('joins a header that spans two rows', () => {
    const rows = [
      ['School', 'Room', '', 'Floor area', 'Ceiling height'],
      ['', 'code', 'name', '(m2)', '(m)'],
      ['A', 'G1', 'x', 50, 2.7],
    ];
    const header = detectHeader(rows);
    expect(header?.row).toBe(1);
    expect(header?.rowCount).toBe(2);
    expect(header?.columns.map((c) => c.field)).toEqual(['school', 'code', 'name', 'floorAreaM2', 'ceilingHeightM']);
  });
  it('is unsure when the school or room code column is not found', () => {
    const header = detectHeader([
      ['Thing', 'Floor area', 'Pupils', 'Notes'],
      ['x', 50, 30, ''],
    ]);
    expect(header?.confident).toBe(false);
  });
  it('uses the row the user picked', () => {
    const rows = [
      ['School', 'Room code', 'Floor area'],
      ['Site', 'Room', 'Area'],
    ];
    expect(detectHeader(rows, new Map(), 2)?.row).toBe(2);
  });
});
