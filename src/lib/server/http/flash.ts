/**
 * A message shown once on the page a form returns to: the API route that handled the form sets it in a short-lived
 * cookie and redirects; the page takes it (reading clears it). A cookie rather than the URL, so nobody can link to our
 * page with words of their own in it.
 */
import type { AstroCookies } from 'astro';
import { z } from 'zod';
import { config } from '../config';

const FLASH_COOKIE = 'airtally_flash';

const FlashSchema = z.object({ kind: z.enum(['ok', 'error']), message: z.string().max(1000) });
/** A message for the next page: done ('ok') or refused ('error'). */
export type Flash = z.infer<typeof FlashSchema>;

/** The Set-Cookie header that carries `flash` to the next page (one minute at most). */
export function flashCookie(flash: Flash): string {
  const secure = config().auth.secureCookies ? '; Secure' : '';
  return `${FLASH_COOKIE}=${encodeURIComponent(JSON.stringify(flash))}; Path=/; Max-Age=60; HttpOnly; SameSite=Lax${secure}`;
}

/** The message a form left for this page, if any; it is shown once. */
export function takeFlash(cookies: AstroCookies): Flash | null {
  const raw = cookies.get(FLASH_COOKIE)?.value;
  if (raw === undefined) return null;
  cookies.delete(FLASH_COOKIE, { path: '/' });
  try {
    const parsed = FlashSchema.safeParse(JSON.parse(raw));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}
