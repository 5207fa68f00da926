// Signing in against the running app, for integration and browser tests of every feature.
import { randomUUID } from 'node:crypto';
import { waitForMail } from './mail';

/** The app under test (scripts/test.mjs sets APP_URL). */
export const APP_URL = (process.env.APP_URL ?? 'http://127.0.0.1:4399').replace(/\/$/, '');

/** The demo accounts' shared password (scripts/seed/demo-accounts.ts). */
export const DEMO_PASSWORD = 'airtally-demo-2026';

/** The seeded demo account for each role in the demo trust ('demo-trust'). */
export const DEMO_ACCOUNTS = {
  trust_admin: 'trust.admin@demo.airtally.test',
  estates_manager: 'estates@demo.airtally.test',
  finance_lead: 'finance@demo.airtally.test',
  viewer: 'viewer@demo.airtally.test',
} as const;

export type DemoRole = keyof typeof DEMO_ACCOUNTS;

/** Turns a response's Set-Cookie headers into a Cookie header value (name=value pairs). */
export function cookieFrom(response: Response): string {
  return response.headers
    .getSetCookie()
    .map((line) => line.split(';')[0] ?? '')
    .filter((pair) => pair.includes('=') && !pair.endsWith('='))
    .join('; ');
}

/**
 * Calls the app. `cookie` is sent as the Cookie header; a string body is sent as JSON; the Origin
 * header is set like a browser's, so better-auth's and Astro's origin checks pass.
 */
export async function api(path: string, init: RequestInit & { cookie?: string | undefined } = {}): Promise<Response> {
  const { cookie, headers: given, ...rest } = init;
  const headers = new Headers(given);
  if (cookie) headers.set('cookie', cookie);
  if (!headers.has('origin')) headers.set('origin', APP_URL);
  if (typeof rest.body === 'string' && !headers.has('content-type')) headers.set('content-type', 'application/json');
  return fetch(`${APP_URL}${path}`, { redirect: 'manual', ...rest, headers });
}

/** Signs in with e-mail and password; resolves to the Cookie header of the new session. */
export async function signIn(email: string, password: string = DEMO_PASSWORD): Promise<string> {
  const response = await api('/api/auth/sign-in/email', { method: 'POST', body: JSON.stringify({ email, password }) });
  if (!response.ok) throw new Error(`Sign-in as ${email} failed: ${response.status} ${await response.text()}`);
  const cookie = cookieFrom(response);
  if (!cookie) throw new Error(`Sign-in as ${email} set no session cookie`);
  return cookie;
}

/** A unique address for a throwaway test user. */
export function uniqueEmail(label = 'user'): string {
  return `${label}-${randomUUID().slice(0, 8)}@test.airtally.test`;
}

/**
 * Signs up a new account (naming a trust, or with an invitation) and signs it in with its password, still
 * unconfirmed. Sign-up answers 202 and finishes in the background; its confirmation e-mail is sent last,
 * so once it has arrived the account and its trust or membership exist.
 */
export async function signUp(fields: {
  name: string;
  email: string;
  password?: string;
  trustName?: string;
  invitationId?: string;
}): Promise<string> {
  const password = fields.password ?? DEMO_PASSWORD;
  const response = await api('/api/account/sign-up', { method: 'POST', body: JSON.stringify({ ...fields, password }) });
  if (response.status !== 202) throw new Error(`Sign-up failed: ${response.status} ${await response.text()}`);
  // An invitation's link proves the address: such an account is ready at once (no confirmation link).
  await waitForMail(fields.email, fields.invitationId ? 'account is ready' : 'Confirm your e-mail');
  return signIn(fields.email, password);
}

/**
 * Signs up a fresh user who names a new trust (and so is its trust admin), for cross-trust tests.
 * The new trust has no schools.
 */
export async function createOtherTrust(): Promise<{ cookie: string; trustId: string; email: string }> {
  const email = uniqueEmail('other-trust');
  const cookie = await signUp({
    name: 'Other Trust Admin',
    email,
    trustName: `Other Test Trust ${email.slice(12, 20)}`,
  });
  const account = (await (await api('/api/account', { cookie })).json()) as { trust: { id: string } | null };
  if (!account.trust) throw new Error(`The new account ${email} has no trust`);
  return { cookie, trustId: account.trust.id, email };
}

/** Posts an HTML form (urlencoded, as a browser without JavaScript would) to `path`; the answer is not followed. */
export function postForm(path: string, fields: Record<string, string | string[]>, cookie?: string): Promise<Response> {
  const body = new URLSearchParams();
  for (const [name, value] of Object.entries(fields))
    for (const one of Array.isArray(value) ? value : [value]) body.append(name, one);
  return api(path, {
    method: 'POST',
    cookie,
    headers: { 'content-type': 'application/x-www-form-urlencoded' },
    body: body.toString(),
  });
}

/** The one-time message a form's answer leaves for the next page (the `airtally_flash` cookie), or null. */
export function flashOf(response: Response): { kind: string; message: string } | null {
  for (const line of response.headers.getSetCookie()) {
    const match = /^airtally_flash=([^;]*)/.exec(line);
    if (match?.[1]) return JSON.parse(decodeURIComponent(match[1])) as { kind: string; message: string };
  }
  return null;
}
