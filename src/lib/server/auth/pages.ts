import { fromAuthError } from './auth.errors';
import { AppError } from '../http/errors';
import { ZodError } from 'zod';

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
