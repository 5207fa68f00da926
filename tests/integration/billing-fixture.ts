// Shared steps of the billing tests: a verified trust admin of a fresh trust, paying on the
// payments fake's hosted checkout page, and the fake's test helpers (renewals, held webhooks).
import Stripe from 'stripe';
import { api, createOtherTrust } from '../helpers/session';
import { linkIn, waitForMail } from '../helpers/mail';
import { waitFor } from '../helpers/wait';

/** The SDK pointed where the app under test points it (scripts/test.mjs passes STRIPE_*). */
export function provider(): Stripe {
  const key = process.env.STRIPE_SECRET_KEY;
  if (!key) throw new Error('STRIPE_SECRET_KEY is not set: run the tests through `npm test`.');
  return new Stripe(key, {
    host: process.env.STRIPE_API_HOST ?? '127.0.0.1',
    port: Number(process.env.STRIPE_API_PORT ?? 54337),
    protocol: (process.env.STRIPE_API_PROTOCOL as 'http' | 'https' | undefined) ?? 'http',
    maxNetworkRetries: 0,
  });
}

/** Calls one of the fake's test helpers (simulated renewals, webhook hold/release, redelivery). */
export async function fakeAdmin<T = unknown>(path: string, body: Record<string, string> = {}): Promise<T> {
  const response = await fetch(`${process.env.PAYMENTS_FAKE_URL}${path}`, {
    method: 'POST',
    headers: {
      authorization: `Bearer ${process.env.STRIPE_SECRET_KEY}`,
      'content-type': 'application/x-www-form-urlencoded',
    },
    body: new URLSearchParams(body),
  });
  if (!response.ok) throw new Error(`${path}: ${response.status} ${await response.text()}`);
  return (await response.json()) as T;
}

/** Polls until `check` returns a value (not undefined/false); throws after `timeoutMs` (the shared waitFor). */
export const waitUntil = <T>(
  what: string,
  check: () => Promise<T | undefined | false>,
  timeoutMs = 15_000,
): Promise<T> => waitFor(what, check, { timeoutMs });

export interface BillingBody {
  billing: {
    plan: 'free' | 'per_school';
    status: string;
    interval: 'month' | 'year' | null;
    quantity: number;
    schoolCount: number;
    cancelAtPeriodEnd: boolean;
    mode: 'ok' | 'grace' | 'read_only';
    graceEndsAt: string | null;
    trialEnd: string | null;
    limits: { maxSchools: number | null; maxRooms: number | null };
  };
  upcoming: { amountDuePence: number; date: string } | null;
}

/** GET /api/billing as the given session. */
export async function billingOf(cookie: string): Promise<BillingBody> {
  const response = await api('/api/billing', { cookie });
  if (response.status !== 200) throw new Error(`GET /api/billing: ${response.status} ${await response.text()}`);
  return (await response.json()) as BillingBody;
}

let schoolSeq = 0;
/** POST /api/schools with a valid new school. */
export function addSchool(cookie: string, name = `Test School ${Date.now()}-${++schoolSeq}`) {
  return api('/api/schools', {
    method: 'POST',
    cookie,
    body: JSON.stringify({ name, phase: 'primary', climateRegion: 'midlands' }),
  });
}

/** A fresh trust whose admin has confirmed their e-mail (needed to start a paid plan). */
export async function verifiedTrust(): Promise<{ cookie: string; trustId: string; email: string }> {
  const trust = await createOtherTrust();
  const mail = await waitForMail(trust.email, 'Confirm your e-mail');
  const link = linkIn(mail, '/verify-email');
  const page = await api(`${link.pathname}${link.search}`, { cookie: trust.cookie });
  if (page.status !== 200) throw new Error(`E-mail confirmation failed: ${page.status}`);
  return trust;
}

/** Submits the fake's hosted checkout form with a card number, as a browser would. */
export function payOnCheckoutPage(url: string, cardNumber: string, email = 'payer@test.airtally.test') {
  return fetch(url, {
    method: 'POST',
    redirect: 'manual',
    body: new URLSearchParams({ email, cardNumber, expiry: '12 / 34', cvc: '123', name: 'Test Payer' }),
  });
}

/** Starts checkout through the API and pays with the test card; resolves once the webhook made the plan paid. */
export async function upgrade(cookie: string, interval: 'month' | 'year' = 'month'): Promise<BillingBody> {
  const response = await api('/api/billing/checkout', { method: 'POST', cookie, body: JSON.stringify({ interval }) });
  if (response.status !== 201) throw new Error(`checkout: ${response.status} ${await response.text()}`);
  const { url } = (await response.json()) as { url: string };
  const paid = await payOnCheckoutPage(url, '4242 4242 4242 4242');
  if (paid.status !== 303) throw new Error(`checkout page: ${paid.status}`);
  return waitUntil('the webhook puts the trust on the paid plan', async () => {
    const body = await billingOf(cookie);
    return body.billing.plan === 'per_school' ? body : undefined;
  });
}

type TestDb = import('kysely').Kysely<import('../../db/database').Database>;

/** A provider id stored on the trust's billing account; throws when none is stored. */
async function storedProviderId(
  db: TestDb,
  trustId: string,
  column: 'provider_subscription_id' | 'provider_customer_id',
): Promise<string> {
  const row = await db
    .selectFrom('billing_accounts')
    .select(column)
    .where('trust_id', '=', trustId)
    .executeTakeFirstOrThrow();
  const id = (row as Record<typeof column, string | null>)[column];
  if (!id) throw new Error(`no ${column} stored`);
  return id;
}

/** The provider subscription id stored for a trust. */
export function subscriptionIdOf(db: TestDb, trustId: string): Promise<string> {
  return storedProviderId(db, trustId, 'provider_subscription_id');
}

/**
 * Waits until the app has stored every event the provider has sent about the trust's customer since `sinceSeconds`
 * (unix seconds). The app stores an event in the same transaction that applies it, so afterwards no late genuine
 * webhook of this trust can still change its rows.
 */
export async function waitForTrustEvents(db: TestDb, trustId: string, sinceSeconds: number): Promise<void> {
  const customerId = await storedProviderId(db, trustId, 'provider_customer_id');
  const ids: string[] = [];
  // Newest first: stop at the first event older than the test.
  for await (const event of provider().events.list({ limit: 100 })) {
    if (event.created < sinceSeconds) break;
    const object = event.data.object as { id?: string; customer?: unknown };
    if (object.customer === customerId || object.id === customerId) ids.push(event.id);
  }
  if (ids.length === 0) throw new Error(`no provider events about ${customerId} since ${sinceSeconds}`);
  await waitUntil(`the app stores the ${ids.length} provider events about the trust`, async () => {
    const stored = await db.selectFrom('payment_events').select('id').where('id', 'in', ids).execute();
    return stored.length === ids.length;
  });
}

/**
 * Proration by the provider's documented rule (https://docs.stripe.com/billing/subscriptions/prorations): the price
 * times the time remaining in the period over the length of the period, in days, rounded to the penny. An
 * independent check of the figures the app shows, from the provider's own period and prices.
 */
export function proratedPence(unitPence: number, qty: number, start: number, end: number, at: number): number {
  const DAY_S = 86_400;
  return Math.round((unitPence * qty * ((end - at) / DAY_S)) / ((end - start) / DAY_S));
}
