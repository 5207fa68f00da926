// The local payments fake, tested through the official SDK the app uses: if the fake drifts from
// the provider's wire format (form encoding, object and error shapes, signatures), these fail.
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Stripe from 'stripe';
import { startPaymentsFake } from '../../scripts/payments-fake/server.mjs';
import { waitFor as waitForShared } from '../helpers/wait';

const KEY = 'sk_test_fake_suite';
const WEBHOOK_SECRET = 'whsec_fake_suite_secret';
const DAY_S = 86_400;

interface Received {
  event: Stripe.Event;
  header: string;
  raw: string;
}

let fake: { port: number; close(): Promise<void> };
let receiver: http.Server;
let stripe: Stripe;
const received: Received[] = [];
/** How many more deliveries the receiver answers with 500 before accepting. */
let failNext = 0;

/** Waits (every 25 ms, at most 10 s) until `find` answers something; throws otherwise. */
const waitFor = <T>(what: string, find: () => T | undefined, timeoutMs = 10_000): Promise<T> =>
  waitForShared(what, find, { timeoutMs, intervalMs: 25 });

const eventsOf = (type: string, objectId?: string) =>
  received.filter(
    (r) => r.event.type === type && (!objectId || (r.event.data.object as { id?: string }).id === objectId),
  );

async function monthlyPrice(unitAmount = 2400, lookupKey?: string): Promise<Stripe.Price> {
  return stripe.prices.create({
    currency: 'gbp',
    unit_amount: unitAmount,
    recurring: { interval: 'month' },
    product_data: { name: 'Whole Estate' },
    ...(lookupKey ? { lookup_key: lookupKey } : {}),
  });
}

async function admin(path: string, body: Record<string, string> = {}) {
  const response = await fetch(`http://127.0.0.1:${fake.port}${path}`, {
    method: 'POST',
    headers: { authorization: `Bearer ${KEY}`, 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams(body),
  });
  return response.json();
}

beforeAll(async () => {
  receiver = http.createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      if (failNext > 0) {
        failNext -= 1;
        res.writeHead(500).end('not now');
        return;
      }
      const raw = Buffer.concat(chunks).toString('utf8');
      received.push({ event: JSON.parse(raw), header: String(req.headers['stripe-signature']), raw });
      res.writeHead(200).end('{}');
    });
  });
  await new Promise<void>((r) => receiver.listen(0, '127.0.0.1', () => r()));
  const receiverPort = (receiver.address() as { port: number }).port;
  fake = await startPaymentsFake({
    port: 0,
    apiKey: KEY,
    webhookUrl: `http://127.0.0.1:${receiverPort}/hook`,
    webhookSecret: WEBHOOK_SECRET,
    retryBaseMs: 40,
    maxAttempts: 5,
    stateFile: null,
    log: () => undefined,
  });
  stripe = new Stripe(KEY, { host: '127.0.0.1', port: fake.port, protocol: 'http', maxNetworkRetries: 0 });
});

afterAll(async () => {
  await fake?.close();
  await new Promise((r) => receiver?.close(r));
});

describe('payments fake: API objects and errors through the SDK', () => {
  it('creates and retrieves a customer with metadata', async () => {
    const created = await stripe.customers.create({
      email: 'bursar@example.test',
      name: 'Example Trust',
      metadata: { trust_id: 't-1' },
    });
    expect(created.id).toMatch(/^cus_/);
    const fetched = await stripe.customers.retrieve(created.id);
    expect(fetched).toMatchObject({ object: 'customer', email: 'bursar@example.test', metadata: { trust_id: 't-1' } });
  });

  it('answers an unknown id with the provider error shape (404, resource_missing)', async () => {
    const error = await stripe.subscriptions.retrieve('sub_doesnotexist').catch((e: unknown) => e);
    expect(error).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    expect(error).toMatchObject({ statusCode: 404, code: 'resource_missing' });
  });

  it('refuses a wrong secret key with an authentication error', async () => {
    const other = new Stripe('sk_test_wrong', {
      host: '127.0.0.1',
      port: fake.port,
      protocol: 'http',
      maxNetworkRetries: 0,
    });
    const error = await other.customers.create({}).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(Stripe.errors.StripeAuthenticationError);
  });

  it('finds prices by lookup key and refuses a second price with the same key', async () => {
    const price = await monthlyPrice(2400, 'suite_monthly');
    const found = await stripe.prices.list({ lookup_keys: ['suite_monthly'] });
    expect(found.data.map((p) => p.id)).toEqual([price.id]);
    const error = await monthlyPrice(2400, 'suite_monthly').catch((e: unknown) => e);
    expect(error).toMatchObject({ statusCode: 400, param: 'lookup_key' });
  });

  it('replays the first response for a repeated Idempotency-Key and refuses it with other parameters', async () => {
    const first = await stripe.customers.create({ email: 'once@example.test' }, { idempotencyKey: 'key-123' });
    const again = await stripe.customers.create({ email: 'once@example.test' }, { idempotencyKey: 'key-123' });
    expect(again.id).toBe(first.id);
    const clash = await stripe.customers
      .create({ email: 'other@example.test' }, { idempotencyKey: 'key-123' })
      .catch((e: unknown) => e);
    expect(clash).toBeInstanceOf(Stripe.errors.StripeIdempotencyError);
  });
});

describe('payments fake: hosted checkout with test cards', () => {
  it('declines 4000 0000 0000 0002, then subscribes with 4242 4242 4242 4242 and sends a signed event', async () => {
    const price = await monthlyPrice();
    const customer = await stripe.customers.create({ email: 'admin@example.test' });
    const session = await stripe.checkout.sessions.create({
      mode: 'subscription',
      customer: customer.id,
      line_items: [{ price: price.id, quantity: 3 }],
      success_url: 'http://app.example.test/done?session={CHECKOUT_SESSION_ID}',
      cancel_url: 'http://app.example.test/cancel',
      subscription_data: { trial_period_days: 30, metadata: { trust_id: 'trust-9' } },
    });
    expect(session.url).toMatch(new RegExp(`^http://127.0.0.1:${fake.port}/checkout/cs_test_`));
    const page = await (await fetch(session.url!)).text();
    expect(page).toContain('3 × £24.00');

    const pay = (card: string) =>
      fetch(session.url!, {
        method: 'POST',
        redirect: 'manual',
        body: new URLSearchParams({ email: 'admin@example.test', cardNumber: card, expiry: '12/34', cvc: '123' }),
      });
    const declined = await pay('4000 0000 0000 0002');
    expect(declined.status).toBe(402);
    expect(await declined.text()).toContain('Your card was declined.');
    expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe('open');

    const paid = await pay('4242 4242 4242 4242');
    expect(paid.status).toBe(303);
    expect(paid.headers.get('location')).toBe(`http://app.example.test/done?session=${session.id}`);
    const done = await stripe.checkout.sessions.retrieve(session.id);
    expect(done.status).toBe('complete');
    const sub = await stripe.subscriptions.retrieve(String(done.subscription));
    expect(sub.status).toBe('trialing');
    expect(sub.metadata).toEqual({ trust_id: 'trust-9' });
    expect(sub.items.data[0]!.quantity).toBe(3);
    expect(sub.trial_end! - sub.trial_start!).toBe(30 * DAY_S);

    const delivery = await waitFor(
      'checkout.session.completed',
      () => eventsOf('checkout.session.completed', session.id)[0],
    );
    const verified = stripe.webhooks.constructEvent(delivery.raw, delivery.header, WEBHOOK_SECRET);
    expect(verified.id).toBe(delivery.event.id);
    expect(() => stripe.webhooks.constructEvent(delivery.raw, delivery.header, 'whsec_someone_else')).toThrow(
      Stripe.errors.StripeSignatureVerificationError,
    );
  });
});

const prorationOf = (lines: Stripe.InvoiceLineItem[], keep: (l: Stripe.InvoiceLineItem) => boolean) =>
  lines.filter(keep).reduce((sum, l) => sum + l.amount, 0);

describe('payments fake: subscription changes', () => {
  async function activeSubscription(quantity: number) {
    const price = await monthlyPrice();
    const customer = await stripe.customers.create({
      email: 'fin@example.test',
      payment_method: 'pm_card_visa',
      invoice_settings: { default_payment_method: 'pm_card_visa' },
    });
    const sub = await stripe.subscriptions.create({ customer: customer.id, items: [{ price: price.id, quantity }] });
    return { price, customer, sub };
  }

  it('charges the first period at once when there is no trial', async () => {
    const { sub } = await activeSubscription(2);
    expect(sub.status).toBe('active');
    const invoices = await stripe.invoices.list({ subscription: sub.id });
    expect(invoices.data.map((i) => [i.status, i.amount_paid])).toEqual([['paid', 4800]]);
  });

  it('prorates a quantity increase onto the upcoming invoice (one more school just after the start ≈ one month)', async () => {
    const { sub, customer } = await activeSubscription(2);
    await stripe.subscriptions.update(sub.id, {
      items: [{ id: sub.items.data[0]!.id, quantity: 3 }],
      proration_behavior: 'create_prorations',
    });
    const upcoming = await stripe.invoices.createPreview({ customer: customer.id, subscription: sub.id });
    const prorations = upcoming.lines.data.filter((l) => l.parent?.subscription_item_details?.proration);
    const net = prorations.reduce((sum, l) => sum + l.amount, 0);
    // One extra school for (almost) a whole month at £24: within a penny or two of 2400.
    expect(net).toBeGreaterThan(2390);
    expect(net).toBeLessThanOrEqual(2400);
    // Next period: 3 schools × £24.
    expect(upcoming.amount_due - net).toBe(7200);
  });

  it('switches to yearly at once: credits the unused month and charges the year', async () => {
    const { sub } = await activeSubscription(2);
    const yearly = await stripe.prices.create({
      currency: 'gbp',
      unit_amount: 24000,
      recurring: { interval: 'year' },
      product_data: { name: 'Whole Estate yearly' },
    });
    const updated = await stripe.subscriptions.update(sub.id, {
      items: [{ id: sub.items.data[0]!.id, price: yearly.id }],
    });
    const item = updated.items.data[0]!;
    expect(item.price.recurring?.interval).toBe('year');
    expect(item.current_period_end - item.current_period_start).toBeGreaterThanOrEqual(365 * DAY_S);
    const latest = await stripe.invoices.retrieve(String(updated.latest_invoice));
    const credit = latest.lines.data.find((l) => l.amount < 0)!;
    expect(credit.amount).toBeGreaterThanOrEqual(-4800);
    expect(credit.amount).toBeLessThan(-4790);
    expect(latest.lines.data.some((l) => l.amount === 48000)).toBe(true);
    expect(latest.status).toBe('paid');
  });

  // Proration by the provider's documented rule (time remaining in the period ÷ length of the period × the price
  // difference; https://docs.stripe.com/billing/subscriptions/prorations), computed here in whole days from the
  // subscription's own period and prices.
  const proratedPence = (unitPence: number, qty: number, start: number, end: number, at: number) =>
    Math.round((unitPence * qty * ((end - at) / DAY_S)) / ((end - start) / DAY_S));

  it('previews a quantity change with its proration (time remaining ÷ period × price) and stores nothing', async () => {
    const { sub, price } = await activeSubscription(2);
    const item = sub.items.data[0]!;
    const at = item.current_period_start + 10 * DAY_S; // 10 days into the period
    const preview = await stripe.invoices.createPreview({
      subscription: sub.id,
      subscription_details: {
        items: [{ id: item.id, quantity: 5 }],
        proration_date: at,
        proration_behavior: 'create_prorations',
      },
    });
    const prorations = preview.lines.data.filter((l) => l.parent?.subscription_item_details?.proration);
    const credit = prorationOf(prorations, (l) => l.amount < 0);
    const charge = prorationOf(prorations, (l) => l.amount > 0);
    const start = item.current_period_start;
    const end = item.current_period_end;
    expect(credit).toBe(-proratedPence(price.unit_amount!, 2, start, end, at));
    expect(charge).toBe(proratedPence(price.unit_amount!, 5, start, end, at));
    // A month of 28–31 days with 10 used: 3 more schools × £24 × (days left ÷ days) lies between 18/28 and 21/31 of £72.
    expect(credit + charge).toBeGreaterThanOrEqual(Math.floor((7200 * 18) / 28));
    expect(credit + charge).toBeLessThanOrEqual(Math.ceil((7200 * 21) / 31));
    // The next renewal at the new quantity, 5 × £24.
    expect(preview.amount_due - (credit + charge)).toBe(12000);
    expect((preview as unknown as { subscription_proration_date: number }).subscription_proration_date).toBe(at);
    // Nothing changed.
    const after = await stripe.subscriptions.retrieve(sub.id);
    expect(after.items.data[0]!.quantity).toBe(2);
    const plain = await stripe.invoices.createPreview({ subscription: sub.id });
    expect(plain.amount_due).toBe(4800);
  });

  it('previews a switch to yearly exactly as the update then invoices it, for the same proration date', async () => {
    const { sub, price } = await activeSubscription(3);
    const yearly = await stripe.prices.create({
      currency: 'gbp',
      unit_amount: 24000,
      recurring: { interval: 'year' },
      product_data: { name: 'Whole Estate yearly' },
    });
    const backdated = await admin(`/_fake/subscriptions/${sub.id}/backdate`, { days: '12' });
    const current = await stripe.subscriptions.retrieve(sub.id);
    const item = current.items.data[0]!;
    expect(backdated).toMatchObject({ id: sub.id, object: 'subscription' });
    expect(Math.abs(item.current_period_start - (Math.floor(Date.now() / 1000) - 12 * DAY_S))).toBeLessThan(5);
    const at = Math.floor(Date.now() / 1000);
    const preview = await stripe.invoices.createPreview({
      subscription: sub.id,
      subscription_details: { items: [{ id: item.id, price: yearly.id }], proration_date: at },
    });
    const credit = -proratedPence(price.unit_amount!, 3, item.current_period_start, item.current_period_end, at);
    expect(preview.lines.data.map((l) => l.amount).sort((a, b) => a - b)).toEqual([credit, 72000]);
    expect(preview.amount_due).toBe(72000 + credit);
    expect((await stripe.subscriptions.retrieve(sub.id)).items.data[0]!.price.id).toBe(price.id);
    const updated = await stripe.subscriptions.update(sub.id, {
      items: [{ id: item.id, price: yearly.id }],
      proration_date: at,
    });
    const invoice = await stripe.invoices.retrieve(String(updated.latest_invoice));
    expect(invoice.amount_due).toBe(preview.amount_due);
  });

  it('backdates a period only by a whole number of days', async () => {
    const { sub } = await activeSubscription(1);
    const refused = await admin(`/_fake/subscriptions/${sub.id}/backdate`, { days: 'soon' });
    expect(refused).toMatchObject({ error: { type: 'invalid_request_error' } });
  });

  it('cancels at period end and resumes', async () => {
    const { sub } = await activeSubscription(1);
    const cancelled = await stripe.subscriptions.update(sub.id, { cancel_at_period_end: true });
    expect(cancelled.cancel_at_period_end).toBe(true);
    expect(cancelled.cancel_at).toBe(cancelled.items.data[0]!.current_period_end);
    const none = await stripe.invoices.createPreview({ subscription: sub.id }).catch((e: unknown) => e);
    expect(none).toMatchObject({ code: 'invoice_upcoming_none' });
    const resumed = await stripe.subscriptions.update(sub.id, { cancel_at_period_end: false });
    expect([resumed.cancel_at_period_end, resumed.cancel_at]).toEqual([false, null]);
  });

  it('simulates a failed renewal, exhausted retries (unpaid) and a later successful payment', async () => {
    const { sub } = await activeSubscription(2);
    const firstEnd = sub.items.data[0]!.current_period_end;
    await admin(`/_fake/subscriptions/${sub.id}/renew`, { outcome: 'fail' });
    let now = await stripe.subscriptions.retrieve(sub.id);
    expect(now.status).toBe('past_due');
    expect(now.items.data[0]!.current_period_start).toBe(firstEnd);
    const open = await stripe.invoices.list({ subscription: sub.id, status: 'open' });
    expect(open.data).toHaveLength(1);
    await waitFor('invoice.payment_failed', () => eventsOf('invoice.payment_failed', open.data[0]!.id)[0]);
    for (let i = 0; i < 3; i += 1) await admin(`/_fake/subscriptions/${sub.id}/renew`, { outcome: 'fail' });
    now = await stripe.subscriptions.retrieve(sub.id);
    expect(now.status).toBe('unpaid');
    await admin(`/_fake/subscriptions/${sub.id}/renew`, { outcome: 'succeed' });
    now = await stripe.subscriptions.retrieve(sub.id);
    expect(now.status).toBe('active');
    expect((await stripe.invoices.retrieve(open.data[0]!.id)).status).toBe('paid');
  });

  it('pays an overdue invoice on the hosted invoice page: a declined card changes nothing, the test card reactivates', async () => {
    const { sub } = await activeSubscription(1);
    for (let i = 0; i < 4; i += 1) await admin(`/_fake/subscriptions/${sub.id}/renew`, { outcome: 'fail' });
    expect((await stripe.subscriptions.retrieve(sub.id)).status).toBe('unpaid');
    const [open] = (await stripe.invoices.list({ subscription: sub.id, status: 'open' })).data;
    const pay = (card: string) =>
      fetch(open!.hosted_invoice_url!, {
        method: 'POST',
        body: new URLSearchParams({ cardNumber: card, expiry: '12/34', cvc: '123' }),
      });
    const declined = await pay('4000 0000 0000 0002');
    expect(declined.status).toBe(402);
    expect((await stripe.subscriptions.retrieve(sub.id)).status).toBe('unpaid');
    const paid = await pay('4242 4242 4242 4242');
    expect(paid.status).toBe(200);
    expect(await paid.text()).toContain('Paid. Thank you');
    const after = await stripe.subscriptions.retrieve(sub.id);
    expect(after.status).toBe('active');
    expect((await stripe.invoices.retrieve(open!.id!)).status).toBe('paid');
  });

  it('ends a subscription set to cancel when its period ends', async () => {
    const { sub } = await activeSubscription(1);
    await stripe.subscriptions.update(sub.id, { cancel_at_period_end: true });
    await admin(`/_fake/subscriptions/${sub.id}/renew`);
    expect((await stripe.subscriptions.retrieve(sub.id)).status).toBe('canceled');
    await waitFor('customer.subscription.deleted', () => eventsOf('customer.subscription.deleted', sub.id)[0]);
  });
});

describe('payments fake: webhook delivery', () => {
  it('retries a failed delivery with the same event until the receiver accepts it', async () => {
    failNext = 2;
    const customer = await stripe.customers.create({ email: 'retry@example.test' });
    const delivery = await waitFor(
      'customer.created after retries',
      () => eventsOf('customer.created', customer.id)[0],
    );
    const log = await (
      await fetch(`http://127.0.0.1:${fake.port}/_fake/deliveries?event=${delivery.event.id}`, {
        headers: { authorization: `Bearer ${KEY}` },
      })
    ).json();
    expect(log.deliveries.map((d: { status: number }) => d.status)).toEqual([500, 500, 200]);
  });

  it('holds events and releases them in reverse order', async () => {
    await admin('/_fake/webhooks/hold');
    const first = await stripe.customers.create({ email: 'first@example.test' });
    const second = await stripe.customers.create({ email: 'second@example.test' });
    expect(eventsOf('customer.created', first.id)).toHaveLength(0);
    const { released } = await admin('/_fake/webhooks/release', { order: 'reverse' });
    expect(released).toHaveLength(2);
    await waitFor(
      'both',
      () => (eventsOf('customer.created', first.id)[0] && eventsOf('customer.created', second.id)[0]) || undefined,
    );
    const order = received
      .filter((r) => r.event.type === 'customer.created')
      .map((r) => (r.event.data.object as Stripe.Customer).id);
    expect(order.indexOf(second.id)).toBeLessThan(order.indexOf(first.id));
  });
});
