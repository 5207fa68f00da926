import { describe, expect, it } from 'vitest';
import { formatCount } from '../../src/lib/format';

describe('formatCount', () => {
  it('says one noun for one and the plural otherwise, with thousands separators', () => {
    expect(formatCount(1, 'room')).toBe('1 room');
    expect(formatCount(0, 'error')).toBe('0 errors');
    expect(formatCount(12_345, 'row')).toBe('12,345 rows');
  });
});

describe('dates, times and numbers one way (en-GB, UK time)', () => {
  it('writes moments in UK time whatever the server zone: GMT in winter, BST in summer', async () => {
    const { formatDate, formatDateTime, formatHeightM, formatPencePerKwh, formatPercent } = await import(
      '../../src/lib/format'
    );
    expect(formatDateTime('2026-12-02T08:08:00Z')).toBe('2 Dec 2026, 08:08');
    // 1 July 2026 is in British Summer Time (UTC+1).
    expect(formatDateTime('2026-07-01T23:30:00Z')).toBe('2 Jul 2026, 00:30');
    expect(formatDate('2026-12-02')).toBe('2 Dec 2026');
    expect(formatDate(null)).toBe('—');
    expect(formatHeightM(2.75)).toBe('2.75 m');
    expect(formatHeightM(3)).toBe('3 m');
    expect(formatPencePerKwh(0.07)).toBe('7 p/kWh');
    expect(formatPercent(0.035)).toBe('3.5 %');
  });
});
