import { describe, expect, it } from 'vitest';
import { guardFormula } from '../../src/lib/server/formula-guard';

// OWASP, "CSV Injection": cells beginning with =, +, -, @, tab or carriage return are run as formulas.
// Spreadsheet programs skip leading white space before deciding, so those are guarded too.
describe('guardFormula', () => {
  it.each([
    ['=1+2'],
    ['+44 20 7946 0000'],
    ['-3'],
    ['@SUM(A1)'],
    ['\tx'],
    ['\rx'],
    ['\nx'],
    [' =HYPERLINK("http://evil.test","Click")'],
    ['   +1'],
    ['\t=1+1'],
    [' \r\n-2'],
    ['\u00a0=1+1'],
    ['\u3000@A1'],
    ['\uff1d1+1'],
  ])('keeps %j as text with a leading apostrophe', (text) => {
    expect(guardFormula(text)).toBe(`'${text}`);
  });

  it.each([['Classroom 3'], ['Year 4 = 30 pupils'], ['  North block'], ["'=already guarded"], ['']])(
    'leaves %j alone',
    (text) => {
      expect(guardFormula(text)).toBe(text);
    },
  );
});
