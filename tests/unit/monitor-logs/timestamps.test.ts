/**
 * Monitor-log timestamps: every export format the importer reads, and Europe/London wall-clock time across both
 * clock changes. Check values: the UK clock changes at 01:00 UTC on the last Sunday of March (to BST, UTC+1) and
 * of October (back to GMT) — Summer Time Order / EU Directive 2000/84/EC, as the IANA tz database encodes it.
 */
import { describe, expect, it } from 'vitest';
import {
  detectFormat,
  joinDateAndTime,
  localDateOf,
  localMidnightUtc,
  localToUtc,
  offsetsForNaive,
  parseTimestamp,
} from '~/lib/server/monitor-logs/timestamps';

const utc = (iso: string) => Date.parse(iso) / 1000;
const naive = (iso: string) => Date.parse(`${iso}Z`) / 1000;

describe('timestamp formats', () => {
  it.each([
    ['2026-10-25 01:30', 'iso', '2026-10-25T01:30:00'],
    ['2026-10-25T01:30:15', 'iso', '2026-10-25T01:30:15'],
    ['2026/01/05 09:05:00', 'iso', '2026-01-05T09:05:00'],
    ['25/10/2026 01:30', 'day_first', '2026-10-25T01:30:00'],
    ['25/10/2026 01:30:59', 'day_first', '2026-10-25T01:30:59'],
    ['05-01-26 9:05', 'day_first', '2026-01-05T09:05:00'],
    ['05.01.2026 09:05', 'day_first', '2026-01-05T09:05:00'],
    ['5/1/2026 1:05 PM', 'day_first', '2026-01-05T13:05:00'],
    ['10/25/2026 01:30', 'month_first', '2026-10-25T01:30:00'],
  ] as const)('reads %s as %s', (text, format, expected) => {
    expect(parseTimestamp(text, format)).toEqual({ seconds: naive(expected), absolute: false });
  });

  it('reads an explicit offset as an absolute instant', () => {
    expect(parseTimestamp('2026-10-25T01:30:00+01:00', 'iso')).toEqual({
      seconds: utc('2026-10-25T00:30:00Z'),
      absolute: true,
    });
    expect(parseTimestamp('2026-10-25T01:30:00Z', 'iso')).toEqual({
      seconds: utc('2026-10-25T01:30:00Z'),
      absolute: true,
    });
  });

  it('reads Excel serial numbers (1900 date system: 45658 is 2025-01-01, Microsoft DATEVALUE)', () => {
    expect(parseTimestamp(45658, 'excel_serial')).toEqual({ seconds: naive('2025-01-01T00:00:00'), absolute: false });
    expect(parseTimestamp('45658.375', 'excel_serial')).toEqual({
      seconds: naive('2025-01-01T09:00:00'),
      absolute: false,
    });
  });

  it('refuses dates that do not exist and text that is not a time', () => {
    expect(parseTimestamp('31/04/2026 10:00', 'day_first')).toBeNull();
    expect(parseTimestamp('2026-13-01 10:00', 'iso')).toBeNull();
    expect(parseTimestamp('hello', 'iso')).toBeNull();
    expect(parseTimestamp('12/03/2026', 'day_first')).toBeNull();
  });

  it('joins a date column and a time column', () => {
    expect(joinDateAndTime('05/01/2026', '09:05')).toBe('05/01/2026 09:05');
    expect(joinDateAndTime(46027, 0.375)).toBe('2026-01-05 09:00:00');
  });

  it('detects day-first dates when a day is above 12', () => {
    expect(detectFormat(['12/01/2026 09:00', '13/01/2026 09:00'])).toMatchObject({
      format: 'day_first',
      assumedDayFirst: false,
    });
  });

  it('detects month-first dates when a series read day-first would jump by months', () => {
    const sample = ['01/05/2026 23:50', '01/05/2026 23:55', '01/06/2026 00:00', '01/06/2026 00:05'];
    expect(detectFormat(sample)).toMatchObject({ format: 'month_first' });
  });

  it('takes the UK day-first reading when the sample cannot tell and says it assumed it', () => {
    expect(detectFormat(['05/01/2026 09:00', '05/01/2026 09:05'])).toMatchObject({
      format: 'day_first',
      assumedDayFirst: true,
    });
  });

  it('detects ISO text, Excel serials and Unix seconds', () => {
    expect(detectFormat(['2026-01-05 09:00:00', '2026-01-05 09:05:00'])?.format).toBe('iso');
    expect(detectFormat([46027.375, 46027.3784722])?.format).toBe('excel_serial');
    expect(detectFormat(['1767603600', '1767603900'])?.format).toBe('unix_seconds');
  });

  it('refuses a column that is not times', () => {
    expect(detectFormat(['Room G12', 'Room G13'])).toBeNull();
  });
});

describe('Europe/London across the clock changes', () => {
  it('has no wall-clock 01:00–01:59 on 29 March 2026 (clocks go forward at 01:00 GMT)', () => {
    expect(offsetsForNaive(naive('2026-03-29T01:30:00'))).toEqual([]);
    expect(localToUtc(naive('2026-03-29T01:30:00'), 0)).toBeNaN();
    expect(localToUtc(naive('2026-03-29T00:55:00'), 0)).toBe(utc('2026-03-29T00:55:00Z'));
    expect(localToUtc(naive('2026-03-29T02:00:00'), 0)).toBe(utc('2026-03-29T01:00:00Z'));
  });

  it('reads the repeated 01:00–01:59 of 25 October 2026 first as BST, then as GMT, in time order', () => {
    const first = localToUtc(naive('2026-10-25T01:30:00'), utc('2026-10-25T00:25:00Z'));
    expect(first).toBe(utc('2026-10-25T00:30:00Z'));
    const again = localToUtc(naive('2026-10-25T01:30:00'), utc('2026-10-25T00:55:00Z'));
    expect(again).toBe(utc('2026-10-25T01:30:00Z'));
  });

  it('gives local days of 23 and 25 hours on the change days', () => {
    expect(localMidnightUtc('2026-03-30') - localMidnightUtc('2026-03-29')).toBe(23 * 3600);
    expect(localMidnightUtc('2026-10-26') - localMidnightUtc('2026-10-25')).toBe(25 * 3600);
    expect(localMidnightUtc('2026-07-01')).toBe(utc('2026-06-30T23:00:00Z'));
  });

  it('puts a summer instant on its British calendar day', () => {
    expect(localDateOf(utc('2026-06-30T23:30:00Z'))).toEqual({ date: '2026-07-01', offsetMin: 60 });
    expect(localDateOf(utc('2026-12-31T23:30:00Z'))).toEqual({ date: '2026-12-31', offsetMin: 0 });
  });
});
