const SAME_ORIGIN = 'http://same-origin.invalid';

/**
 * A path on this site to return to after signing in; anything else falls back to /app. Browsers drop
 * tabs and line breaks from URLs and read backslashes as slashes, so `/\t/evil.test` would become
 * `//evil.test`, another site. So only printable ASCII passes, with no backslash and no encoded slash,
 * backslash, percent sign or control character, and it must still point at this site once parsed.
 */
export function safeNext(value: string | null | undefined): string {
  if (!value || value.length > 2048 || !value.startsWith('/') || value.startsWith('//')) return '/app';
  if (/[^\x21-\x7e]|\\/.test(value)) return '/app';
  if (/%(2f|5c|[01][0-9a-f]|7f|25)/i.test(value)) return '/app';
  const url = new URL(value, SAME_ORIGIN);
  if (url.origin !== SAME_ORIGIN) return '/app';
  return `${url.pathname}${url.search}${url.hash}`;
}
