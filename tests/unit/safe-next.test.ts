import { describe, expect, it } from 'vitest';
import { safeNext } from '../../src/lib/server/http/safe-next';

// Where sign-in may send people afterwards. Browsers strip tab, CR and LF from URLs and read "\" as
// "/" (WHATWG URL Standard, "basic URL parser"), so each of these would otherwise leave the site.
describe('safeNext', () => {
  it.each([
    ['/\t/evil.test'], // what ?next=/%09/evil.test decodes to
    ['/\n/evil.test'],
    ['/\r\n/evil.test'],
    ['//evil.test'],
    ['/\\evil.test'],
    ['/\\/evil.test'],
    ['\\\\evil.test'],
    ['/%2f%2fevil.test'],
    ['/%5C%5Cevil.test'],
    ['/%09/evil.test'],
    ['/%0d%0aSet-Cookie:x=1'],
    ['https://evil.test/app'],
    ['javascript:alert(1)'],
    ['/ /evil.test'],
    ['/app\u2028/x'],
    [''],
    [null],
  ])('sends %j to /app', (value) => {
    expect(safeNext(value)).toBe('/app');
  });

  it.each([['/app'], ['/app/schools?page=2'], ['/accept-invitation?id=abc-123'], ['/app/rooms/%C3%A9t%C3%A9#notes']])(
    'keeps the local path %j',
    (value) => {
      expect(safeNext(value)).toBe(value);
    },
  );
});
