import { fromAuthError } from './auth.errors';
import { AppError } from '../http/errors';
import { ZodError } from 'zod';

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

/** A 303 redirect that also carries the Set-Cookie headers of a better-auth call. */
export function redirectWithCookies(location: string, cookieSource: Headers): Response {
  const headers = new Headers({ location });
  for (const cookie of cookieSource.getSetCookie()) headers.append('set-cookie', cookie);
  return new Response(null, { status: 303, headers });
}

/** The submitted form as plain strings. */
export async function readForm(request: Request): Promise<Record<string, string>> {
  const form = await request.formData();
  const values: Record<string, string> = {};
  for (const [key, value] of form.entries()) if (typeof value === 'string') values[key] = value;
  return values;
}

/** A message a person can act on, and the status the page should answer with. */
export function pageError(error: unknown): { status: number; message: string } {
  const mapped = fromAuthError(error);
  if (mapped instanceof AppError) return { status: mapped.status, message: mapped.message };
  if (mapped instanceof ZodError)
    return { status: 400, message: mapped.issues[0]?.message ?? 'Check the form and try again.' };
  console.error('Unexpected error on an account page', error);
  return { status: 500, message: 'Something went wrong on our side. Please try again.' };
}
