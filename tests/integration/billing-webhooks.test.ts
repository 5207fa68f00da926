// The webhook endpoint and payment failures: signatures, replays, events out of order, and the
// grace period → read-only → paid again cycle, against the running app and the payments fake.
import { afterAll, describe, expect, it } from 'vitest';
import Stripe from 'stripe';
import { api, flashOf, postForm } from '../helpers/session';
import { testDb } from '../helpers/db';
import { waitForMail } from '../helpers/mail';
import {
  addSchool,
  billingOf,
  fakeAdmin,
  provider,
  subscriptionIdOf,
  upgrade,
  verifiedTrust,
  waitForTrustEvents,
  waitUntil,
} from './billing-fixture';

const db = testDb();
afterAll(() => db.destroy());

type ErrorBody = { error: { code: string; message: string } };

const postWebhook = (payload: string, signature?: string) =>
  api('/api/billing/webhook', {
    method: 'POST',
    body: payload,
    headers: { 'content-type': 'application/json', ...(signature ? { 'stripe-signature': signature } : {}) },
  });

const sign = (payload: string, secret = process.env.STRIPE_WEBHOOK_SECRET ?? '') =>
  Stripe.webhooks.generateTestHeaderString({ payload, secret });

/** The stored copies of one event, the trust's audit events and its billing account. */
async function countRows(trustId: string, eventId: string) {
  // Copies of one event, not all events: the provider's other genuine events for every trust keep arriving.
  const events = await db
    .selectFrom('payment_events')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('id', '=', eventId)
    .executeTakeFirstOrThrow();
  const audit = await db
    .selectFrom('audit_events')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('trust_id', '=', trustId)
    .executeTakeFirstOrThrow();
  const account = await db
    .selectFrom('billing_accounts')
    .selectAll()
    .where('trust_id', '=', trustId)
    .executeTakeFirst();
  return { events: Number(events.n), audit: Number(audit.n), account };
}

describe('webhook signatures', () => {
  it('answers 400 and stores nothing for a missing, wrong or tampered signature', async () => {
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    const stripe = provider();
    const [latest] = (await stripe.events.list({ limit: 1 })).data;
    const forgedId = `evt_forged_${Date.now()}`;
    const payload = JSON.stringify({ ...latest, id: forgedId });
    // The checkout's last webhook closes its checkout page; from then on only this test writes to the trust.
    const before = await waitUntil('the checkout is closed', async () => {
      const rows = await countRows(trustId, forgedId);
      return rows.account?.open_checkout_session_id === null ? rows : undefined;
    });
    expect(before.events).toBe(0);

    const missing = await postWebhook(payload);
    expect(missing.status).toBe(400);
    expect(((await missing.json()) as ErrorBody).error.message).toMatch(/Stripe-Signature header is missing/);
    expect((await postWebhook(payload, sign(payload, 'whsec_not_ours'))).status).toBe(400);
    const validForOther = sign(payload);
    expect((await postWebhook(payload.replace('"livemode":false', '"livemode":true'), validForOther)).status).toBe(400);

    // Late genuine webhooks may store the same state again (updated_at); nothing else may change.
    const after = await countRows(trustId, forgedId);
    const { updated_at: _storedAgainBefore, ...accountBefore } = before.account ?? {};
    const { updated_at: _storedAgainAfter, ...accountAfter } = after.account ?? {};
    expect({ ...after, account: accountAfter }).toEqual({ ...before, account: accountBefore });
  });

  it('accepts a correctly signed event', async () => {
    const [latest] = (await provider().events.list({ limit: 1 })).data;
    const payload = JSON.stringify({ ...latest, id: `evt_signed_${Date.now()}` });
    const response = await postWebhook(payload, sign(payload));
    expect(response.status).toBe(200);
    expect(await response.json()).toEqual({ received: true, duplicate: false });
  });
});

describe('replays and order', () => {
  it('stores each event once: a replayed event changes nothing', async () => {
    const sinceSeconds = Math.floor(Date.now() / 1000) - 1;
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    const stripe = provider();
    const events = await stripe.events.list({ type: 'customer.subscription.created', limit: 5 });
    const subscriptionId = await subscriptionIdOf(db, trustId);
    const created = events.data.find((e) => (e.data.object as Stripe.Subscription).id === subscriptionId)!;
    // Every genuine event of the upgrade first (checkout, invoices, subscription): one still in flight would store the
    // same state again, with a new updated_at, after `before` is read.
    await waitForTrustEvents(db, trustId, sinceSeconds);
    const before = await countRows(trustId, created.id);
    expect(before.events).toBe(1);

    await fakeAdmin(`/_fake/events/${created.id}/redeliver`);
    const payload = JSON.stringify(created);
    const again = await postWebhook(payload, sign(payload));
    expect(await again.json()).toEqual({ received: true, duplicate: true });

    expect(await countRows(trustId, created.id)).toEqual(before);
  });

  it("ends in the provider's current state when events arrive in reverse order", async () => {
    const { cookie, trustId } = await verifiedTrust();
    await upgrade(cookie);
    const stripe = provider();
    const subscriptionId = await subscriptionIdOf(db, trustId);
    const sub = await stripe.subscriptions.retrieve(subscriptionId);

    // Changes made at the provider (as in its own dashboard), so only the webhooks tell the app.
    await fakeAdmin('/_fake/webhooks/hold');
    try {
      await stripe.subscriptions.update(subscriptionId, { items: [{ id: sub.items.data[0]!.id, quantity: 4 }] });
      await stripe.subscriptions.update(subscriptionId, { items: [{ id: sub.items.data[0]!.id, quantity: 6 }] });
      await stripe.subscriptions.update(subscriptionId, { cancel_at_period_end: true });
    } finally {
      const { released } = await fakeAdmin<{ released: string[] }>('/_fake/webhooks/release', { order: 'reverse' });
      expect(released.length).toBeGreaterThanOrEqual(3);
    }
    const last = await waitUntil('every released event is stored', async () => {
      const rows = await db
        .selectFrom('payment_events')
        .select('type')
        .where('trust_id', '=', trustId)
        .where('type', '=', 'customer.subscription.updated')
        .execute();
      return rows.length >= 3 ? rows : undefined;
    });
    expect(last.length).toBeGreaterThanOrEqual(3);
    const { billing } = await billingOf(cookie);
    expect([billing.quantity, billing.cancelAtPeriodEnd]).toEqual([6, true]);
  });
});

describe('payment failure', () => {
  it('e-mails the admins, gives a grace period, goes read-only, and is writable again once paid', async () => {
    const { cookie, trustId, email } = await verifiedTrust();
    await upgrade(cookie);
    const subscriptionId = await subscriptionIdOf(db, trustId);

    // The trial ends and the first charge fails: grace period, full use, banner, e-mail.
    await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/renew`, { outcome: 'fail' });
    const grace = await waitUntil('the grace period starts', async () => {
      const body = await billingOf(cookie);
      return body.billing.mode === 'grace' ? body.billing : undefined;
    });
    const graceDays = (new Date(grace.graceEndsAt!).getTime() - Date.now()) / 86_400_000;
    expect(graceDays).toBeGreaterThan(13.9);
    expect(graceDays).toBeLessThanOrEqual(14);
    const mail = await waitForMail(email, 'payment failed');
    expect(mail.text).toMatch(/did not go through/);
    expect(mail.text).toMatch(/Nothing is deleted/);
    expect((await addSchool(cookie)).status).toBe(201);
    const page = await (await api('/app/schools', { cookie })).text();
    expect(page).toContain('data-mode="grace"');

    // The provider's retries fail too: the subscription is unpaid and the trust read-only.
    for (let attempt = 0; attempt < 3; attempt += 1)
      await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/renew`, { outcome: 'fail' });
    await waitUntil('read-only mode', async () => (await billingOf(cookie)).billing.mode === 'read_only');
    const refused = await addSchool(cookie);
    expect(refused.status).toBe(402);
    expect(((await refused.json()) as ErrorBody).error.code).toBe('read_only');
    const schoolsBefore = await db.selectFrom('schools').select('id').where('trust_id', '=', trustId).execute();
    expect((await api('/api/schools', { cookie })).status).toBe(200);
    expect((await api('/api/rooms', { cookie })).status).toBe(200);
    expect((await api('/api/exports/register.csv', { cookie })).status).toBe(200);
    expect(await (await api('/app/schools', { cookie })).text()).toContain('data-mode="read_only"');
    // The members page's invite form posts to the API route, which sends it back to the page with the reason.
    const invite = await postForm(
      '/api/members',
      { email: 'colleague@test.airtally.test', role: 'viewer', back: '/app/settings/members' },
      cookie,
    );
    expect(invite.status).toBe(303);
    expect(invite.headers.get('location')).toBe('/app/settings/members');
    expect(flashOf(invite)).toMatchObject({
      kind: 'error',
      message: expect.stringContaining('nothing has been deleted'),
    });
    const invitations = await db
      .selectFrom('invitation')
      .select('id')
      .where('organizationId', '=', trustId)
      .where('email', '=', 'colleague@test.airtally.test')
      .execute();
    expect(invitations).toHaveLength(0);

    // The billing page links the overdue invoice; paying it with another card makes the trust writable again.
    const billingPage = await (await api('/app/settings/billing', { cookie })).text();
    const invoiceUrl = /href="([^"]+\/invoices\/in_[^"]+)"[^>]*data-testid="pay-overdue"/.exec(billingPage)?.[1];
    expect(invoiceUrl).toBeDefined();
    const paid = await fetch(invoiceUrl!, {
      method: 'POST',
      body: new URLSearchParams({ cardNumber: '4242 4242 4242 4242', expiry: '12/34', cvc: '123' }),
    });
    expect(paid.status).toBe(200);
    await waitUntil('writable again', async () => (await billingOf(cookie)).billing.mode === 'ok');
    expect((await addSchool(cookie)).status).toBe(201);
    const schoolsAfter = await db.selectFrom('schools').select('id').where('trust_id', '=', trustId).execute();
    expect(schoolsAfter.length).toBe(schoolsBefore.length + 1);
  });
});
