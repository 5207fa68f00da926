import { describe, expect, it } from 'vitest';
import { formatCount } from '../../src/lib/format';

describe('formatCount', () => {
  it('says one noun for one and the plural otherwise, with thousands separators', () => {
    expect(formatCount(1, 'room')).toBe('1 room');
    expect(formatCount(0, 'error')).toBe('0 errors');
    expect(formatCount(12_345, 'row')).toBe('12,345 rows');
  });
});
