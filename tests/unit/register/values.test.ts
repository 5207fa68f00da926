import { describe, expect, it } from 'vitest';
import {
  cellText,
  guardFormula,
  parseEnum,
  parseOrientation,
  parseQuantity,
  parseWholeNumber,
  parseYear,
  plainCellValue,
} from '../../../src/lib/server/register/values';
import {
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
  AGE_GROUPS,
} from '../../../src/lib/engine/vocabulary';

const value = <T>(p: { ok: boolean; value?: T | null }) => (p.ok ? p.value : 'error');

describe('reading numbers from register cells', () => {
  it.each([
    [60, 60],
    ['60', 60],
    ['60 m2', 60],
    ['60m²', 60],
    ['60 sqm', 60],
    ['  60.5  ', 60.5],
    ['60,5', 60.5],
    ['1,234.5', 1234.5],
    ['1.234,5', 1234.5],
    ['1,234', 1234],
    ['approx. 55', 55],
  ])('reads area %j as %j m²', (cell, expected) => {
    expect(value(parseQuantity(cell, 'area'))).toBeCloseTo(expected, 9);
  });
  it('converts square feet to square metres (1 ft² = 0.09290304 m², by definition of the international foot)', () => {
    expect(value(parseQuantity('100 sq ft', 'area'))).toBeCloseTo(9.290304, 9);
  });
  it.each([
    ['2.7m', 2.7],
    ['2,7 m', 2.7],
    ['2700 mm', 2.7],
    ['270cm', 2.7],
  ])('reads height %j as %j m', (cell, expected) => {
    expect(value(parseQuantity(cell, 'length'))).toBeCloseTo(expected, 9);
  });
  it('reads a flow in m³/h as l/s (1 l/s = 3.6 m³/h)', () => {
    expect(value(parseQuantity('360 m3/h', 'flow'))).toBeCloseTo(100, 9);
  });
  it('treats TBC and dashes as blank placeholders', () => {
    expect(parseQuantity('TBC', 'area')).toEqual({ ok: true, value: null, placeholder: true });
    expect(parseQuantity(' - ', 'area')).toEqual({ ok: true, value: null, placeholder: true });
    expect(parseQuantity('', 'area')).toEqual({ ok: true, value: null });
  });
  it('refuses words and unknown units with a message', () => {
    expect(parseQuantity('big', 'area').ok).toBe(false);
    expect(parseQuantity('60 acres', 'area')).toEqual({ ok: false, message: '"acres" is not a unit we can read here' });
  });
  it('reads whole numbers and refuses fractions of a pupil', () => {
    expect(value(parseWholeNumber('30 pupils'))).toBe(30);
    expect(value(parseWholeNumber(30.0))).toBe(30);
    expect(parseWholeNumber('30.5').ok).toBe(false);
  });
});

describe('reading years', () => {
  it('reads a year, a date and an Excel date serial (25569 = 1 Jan 1970 in the 1900 date system)', () => {
    expect(value(parseYear(1968))).toBe(1968);
    expect(value(parseYear('c. 1968'))).toBe(1968);
    expect(value(parseYear(new Date(Date.UTC(1965, 8, 1))))).toBe(1965);
    expect(value(parseYear(25569))).toBe(1970);
    expect(value(parseYear('01/09/1972'))).toBe(1972);
  });
});

describe('reading orientation', () => {
  it.each([
    ['SW', 225],
    ['south-west', 225],
    ['South West', 225],
    ['225', 225],
    [225, 225],
    ['225°', 225],
    ['N', 0],
    ['360', 0],
    ['NNE', 23],
    ['east', 90],
    ['North facing', 0],
  ])('reads %j as a bearing of %j degrees', (cell, expected) => {
    expect(value(parseOrientation(cell))).toBe(expected);
  });
  it('refuses a bearing over 360 and unknown words', () => {
    expect(parseOrientation(400).ok).toBe(false);
    expect(parseOrientation('upwards').ok).toBe(false);
  });
});

describe('reading enumerations', () => {
  it.each([
    ['MVHR', VENTILATION_TYPES, 'heat_recovery_unit'],
    ['natural - single sided', VENTILATION_TYPES, 'natural_single_sided'],
    ['Natural, cross-ventilated', VENTILATION_TYPES, 'natural_cross'],
    ['MEV', VENTILATION_TYPES, 'mechanical_extract'],
    ['heat_recovery_unit', VENTILATION_TYPES, 'heat_recovery_unit'],
    ['Casement', WINDOW_TYPES, 'side_hung'],
    ['Tilt & Turn', WINDOW_TYPES, 'tilt_and_turn'],
    ['IT suite', ROOM_USES, 'ict_room'],
    ['Science Lab', ROOM_USES, 'science_lab'],
    ['KS2', AGE_GROUPS, 'primary'],
    ['all through', SCHOOL_PHASES, 'all_through'],
    ['  Secondary  ', SCHOOL_PHASES, 'secondary'],
  ] as const)('reads %j as %s', (cell, codes, expected) => {
    expect(value(parseEnum(cell, codes))).toBe(expected);
  });
  it('names the allowed values when it cannot read one', () => {
    const parsed = parseEnum('jet engine', VENTILATION_TYPES);
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.message).toContain('Heat-recovery unit');
  });
});

describe('cell values', () => {
  it('takes the cached result of formulas, the text of rich text and hyperlinks', () => {
    expect(plainCellValue({ formula: 'B2*C2', result: 56 })).toBe(56);
    expect(plainCellValue({ sharedFormula: 'A1', result: 'G12' })).toBe('G12');
    expect(plainCellValue({ richText: [{ text: 'Year 4 ' }, { text: 'classroom' }] })).toBe('Year 4 classroom');
    expect(plainCellValue({ text: 'Survey note', hyperlink: 'https://example.test/a' })).toBe('Survey note');
    expect(plainCellValue({ error: '#REF!' })).toBeNull();
  });
  it('trims trailing spaces and non-breaking spaces', () => {
    expect(cellText('G12   ')).toBe('G12');
    expect(cellText('\u00a0G12\u00a0')).toBe('G12');
  });
  it('guards formula-like text on export and strips the guard on import', () => {
    for (const text of ['=SUM(A1:A2)', '+44 1234', '-2', '@cmd', '\tx', '\rx']) {
      const guarded = guardFormula(text);
      expect(guarded.startsWith("'")).toBe(true);
      expect(cellText(guarded)).toBe(text.trim() === text ? text : text.trim());
    }
    expect(guardFormula('Year 4')).toBe('Year 4');
  });
});
