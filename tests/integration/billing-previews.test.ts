// Issue 14, item 6: billing without surprises. Every figure the app shows is checked against an independent
// computation from the payment fake's own inputs (its period, its prices), never against the app's answer.
import type Stripe from 'stripe';
import { afterAll, describe, expect, it } from 'vitest';
import { createDb } from '../../src/lib/server/db/client';
import { listMail, waitForMail } from '../helpers/mail';
import { api, postForm, uniqueEmail } from '../helpers/session';
import { messyRegister } from '../unit/register/fixtures';
import {
  addSchool,
  billingOf,
  fakeAdmin,
  provider,
  proratedPence,
  subscriptionIdOf,
  upgrade,
  verifiedTrust,
  waitUntil,
} from './billing-fixture';

const db = createDb(process.env.DATABASE_URL ?? '');
afterAll(async () => {
  await db.destroy();
});

const prorated = proratedPence;

/** A fresh trust on the paid plan, trial over, `days` into a monthly period, paying for `schools` schools. */
async function activeTrust(schools: number, days: number) {
  const trust = await verifiedTrust();
  await upgrade(trust.cookie);
  const subscriptionId = await subscriptionIdOf(db, trust.trustId);
  // Schools added during the trial change the quantity without prorations; the renewal then charges them in full.
  for (let i = 0; i < schools; i++) expect((await addSchool(trust.cookie)).status).toBe(201);
  await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/renew`, { outcome: 'succeed' });
  await waitUntil('the trial ends', async () => (await billingOf(trust.cookie)).billing.status === 'active');
  await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/backdate`, { days: String(days) });
  const stripe = provider();
  const sub = await stripe.subscriptions.retrieve(subscriptionId);
  return { ...trust, subscriptionId, stripe, sub, item: sub.items.data[0]! };
}

const yearlyPrice = async (stripe: Stripe) =>
  (await stripe.prices.list({ lookup_keys: ['airtally_whole_estate_yearly'] })).data[0]!;

interface PeriodPreviewBody {
  preview: {
    from: string;
    to: string;
    schools: number;
    prorationDate: number;
    creditPence: number;
    newPeriodPence: number;
    dueNowPence: number;
    words: string;
  };
}

describe('changing the billing period shows the amount and the proration first', () => {
  it('prices monthly → yearly 12 days into the period as the proration rule says, and changes nothing', async () => {
    const { cookie, stripe, subscriptionId, item, trustId } = await activeTrust(3, 12);
    const yearly = await yearlyPrice(stripe);
    const invoicesBefore = (await stripe.invoices.list({ subscription: subscriptionId })).data.length;
    const before = Math.floor(Date.now() / 1000);
    const response = await api('/api/billing/period-preview?interval=year', { cookie });
    const after = Math.ceil(Date.now() / 1000);
    expect(response.status).toBe(200);
    const { preview } = (await response.json()) as PeriodPreviewBody;

    const qty = item.quantity!;
    expect(qty).toBe(3);
    const start = item.current_period_start;
    const end = item.current_period_end;
    const monthly = item.price.unit_amount!;
    // The credit for the unused part of the month, for any moment of the request.
    expect(preview.creditPence).toBeGreaterThanOrEqual(prorated(monthly, qty, start, end, after));
    expect(preview.creditPence).toBeLessThanOrEqual(prorated(monthly, qty, start, end, before));
    // 12 of 28–31 days used: between 16/28 and 19/31 of three months' price.
    expect(preview.creditPence).toBeGreaterThanOrEqual(Math.floor((monthly * qty * 16) / 28));
    expect(preview.creditPence).toBeLessThanOrEqual(Math.ceil((monthly * qty * 19) / 31));
    expect(preview.newPeriodPence).toBe(yearly.unit_amount! * qty);
    expect(preview.dueNowPence).toBe(yearly.unit_amount! * qty - preview.creditPence);
    expect(preview.words).toContain('charged now');

    // Nothing changed at the provider or in our records.
    const still = await stripe.subscriptions.retrieve(subscriptionId);
    expect(still.items.data[0]!.price.recurring?.interval).toBe('month');
    expect((await stripe.invoices.list({ subscription: subscriptionId })).data.length).toBe(invoicesBefore);
    expect((await billingOf(cookie)).billing.interval).toBe('month');

    // Confirming with the preview's proration moment charges exactly the amount shown.
    const confirmed = await api('/api/billing/period', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ interval: 'year', prorationDate: preview.prorationDate }),
    });
    expect(confirmed.status).toBe(200);
    const changed = await stripe.subscriptions.retrieve(subscriptionId);
    expect(changed.items.data[0]!.price.recurring?.interval).toBe('year');
    const charged = await stripe.invoices.retrieve(String(changed.latest_invoice));
    expect(charged.amount_due).toBe(preview.dueNowPence);
    const audit = await db
      .selectFrom('audit_events')
      .select('summary')
      .where('trust_id', '=', trustId)
      .where('action', '=', 'billing.plan_changed')
      .execute();
    expect(audit.some((a) => a.summary.includes('yearly'))).toBe(true);
  });

  it('refuses a confirmation priced too long ago, in words, and changes nothing', async () => {
    const { cookie, stripe, subscriptionId } = await activeTrust(1, 3);
    const response = await api('/api/billing/period', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ interval: 'year', prorationDate: Math.floor(Date.now() / 1000) - 3 * 3600 }),
    });
    expect(response.status).toBe(409);
    const { error } = (await response.json()) as { error: { message: string } };
    expect(error.message).toContain('check the new figure');
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.price.recurring?.interval).toBe(
      'month',
    );
  });

  it('answers a preview of the period already in use with what to do', async () => {
    const { cookie } = await activeTrust(1, 1);
    const response = await api('/api/billing/period-preview?interval=month', { cookie });
    expect(response.status).toBe(409);
    expect(((await response.json()) as { error: { message: string } }).error.message).toContain(
      'already billed monthly',
    );
    const bad = await api('/api/billing/period-preview?interval=weekly', { cookie });
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { message: string } }).error.message).toContain('"month" or "year"');
  });

  it('shows the price on the billing page before the confirmation button, without changing anything', async () => {
    const { cookie, stripe, subscriptionId } = await activeTrust(2, 5);
    const page = await api('/app/settings/billing?period=year', { cookie });
    const html = await page.text();
    expect(html).toContain('data-testid="period-confirm"');
    expect(html).toContain('Charged now (VAT included)');
    expect(html).toContain('name="prorationDate"');
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.price.recurring?.interval).toBe(
      'month',
    );
  });
});

interface QuantityPreviewBody {
  preview: {
    changes: boolean;
    quantityBefore: number;
    quantityAfter: number;
    prorationPence: number;
    nextInvoicePence: number;
    perPeriodPence: number;
    words: string;
  };
}

describe('adding schools says how the subscription will change, before it does', () => {
  it('prices 2 → 5 schools 10 days into the month by the proration rule, and changes nothing', async () => {
    const { cookie, stripe, subscriptionId, item } = await activeTrust(2, 10);
    const before = Math.floor(Date.now() / 1000);
    const response = await api('/api/billing/quantity-preview?schoolsAfter=5', { cookie });
    const after = Math.ceil(Date.now() / 1000);
    expect(response.status).toBe(200);
    const { preview } = (await response.json()) as QuantityPreviewBody;
    const unit = item.price.unit_amount!;
    const start = item.current_period_start;
    const end = item.current_period_end;
    // Days remaining ÷ days in the period × the price difference (3 more schools), within a penny of rounding.
    const low = prorated(unit, 3, start, end, after) - 1;
    const high = prorated(unit, 3, start, end, before) + 1;
    expect(preview.prorationPence).toBeGreaterThanOrEqual(low);
    expect(preview.prorationPence).toBeLessThanOrEqual(high);
    expect(preview).toMatchObject({ changes: true, quantityBefore: 2, quantityAfter: 5, perPeriodPence: unit * 5 });
    expect(preview.nextInvoicePence).toBe(unit * 5 + preview.prorationPence);
    expect(preview.words).toContain('from 2 schools to 5 schools');
    expect(preview.words).toContain('added to the next invoice');
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.quantity).toBe(2);
  });

  it('says on the register import preview how the subscription changes for the new schools in the file', async () => {
    const { cookie, item, stripe, subscriptionId } = await activeTrust(2, 6);
    const form = new FormData();
    form.set('file', new Blob([new Uint8Array(await messyRegister())]), 'survey with a new school.xlsx');
    const before = Math.floor(Date.now() / 1000);
    const response = await api('/api/imports', { method: 'POST', cookie, body: form });
    const after = Math.ceil(Date.now() / 1000);
    expect(response.status).toBe(201);
    const body = (await response.json()) as {
      summary: { schoolsToCreate: number };
      subscriptionChange: QuantityPreviewBody['preview'] | null;
    };
    expect(body.summary.schoolsToCreate).toBe(1);
    const change = body.subscriptionChange!;
    expect(change).toMatchObject({ changes: true, quantityBefore: 2, quantityAfter: 3 });
    const unit = item.price.unit_amount!;
    expect(change.prorationPence).toBeGreaterThanOrEqual(
      prorated(unit, 1, item.current_period_start, item.current_period_end, after) - 1,
    );
    expect(change.prorationPence).toBeLessThanOrEqual(
      prorated(unit, 1, item.current_period_start, item.current_period_end, before) + 1,
    );
    expect(change.words).toContain('from 2 schools to 3 schools');
    // The preview changed nothing at the provider.
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.quantity).toBe(2);
  });

  it('says the free plan covers one school, and refuses a negative count in words', async () => {
    const { cookie } = await verifiedTrust();
    const free = await api('/api/billing/quantity-preview?schoolsAfter=3', { cookie });
    const { preview } = (await free.json()) as QuantityPreviewBody;
    expect(preview.changes).toBe(false);
    expect(preview.words).toContain('covers 1 school');
    const bad = await api('/api/billing/quantity-preview?schoolsAfter=-1', { cookie });
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { message: string } }).error.message).toContain('cannot be negative');
  });

  it('shows the change on the billing page when the subscription is behind the schools', async () => {
    const { cookie, trustId } = await activeTrust(1, 4);
    // The school count moves ahead of the subscription (as when the provider could not be reached).
    await db.updateTable('billing_accounts').set({ quantity: 1 }).where('trust_id', '=', trustId).execute();
    await addSchoolsQuietly(trustId, 2);
    const html = await (await api('/app/settings/billing', { cookie })).text();
    expect(html).toContain('data-testid="quantity-change"');
    expect(html).toMatch(/from 1 school to 3 schools/);
  });
});

/** Inserts schools straight into the database, so the subscription is not updated (the "behind" case). */
async function addSchoolsQuietly(trustId: string, n: number) {
  for (let i = 0; i < n; i++) {
    await db
      .insertInto('schools')
      .values({
        trust_id: trustId,
        name: `Quiet School ${Date.now()}-${i}`,
        phase: 'primary',
        climate_region: 'midlands',
      })
      .execute();
  }
}

describe('invoices show VAT', () => {
  it('splits every invoice into net, VAT at 20 % (1/6 of a VAT-inclusive total) and gross', async () => {
    const { cookie, stripe, sub } = await activeTrust(2, 2);
    const response = await api('/api/billing/invoices', { cookie });
    const { invoices } = (await response.json()) as {
      invoices: { id: string; netPence: number; vatPence: number; grossPence: number; vatRatePct: number }[];
    };
    const fromProvider = await stripe.invoices.list({ customer: String(sub.customer) });
    expect(invoices.length).toBe(fromProvider.data.length);
    expect(fromProvider.data.some((i) => i.total > 0)).toBe(true);
    for (const providerInvoice of fromProvider.data) {
      const shown = invoices.find((i) => i.id === providerInvoice.id)!;
      // HMRC VAT rates: standard rate 20 %; VAT in a VAT-inclusive price = gross × 20/120.
      const vat = Math.round((providerInvoice.total * 20) / 120);
      expect(shown).toMatchObject({
        grossPence: providerInvoice.total,
        vatPence: vat,
        netPence: providerInvoice.total - vat,
        vatRatePct: 20,
      });
    }
    const html = await (await api('/app/settings/billing', { cookie })).text();
    expect(html).toContain('VAT (20 %)');
    expect(html).toContain('data-testid="invoice-vat"');
  });
});

describe('paying by invoice with a purchase order', () => {
  it('stores and audits the request, e-mails the billing contact and ops, and shows it on the billing page', async () => {
    const { cookie, trustId, email } = await activeTrust(1, 1);
    const billingEmail = uniqueEmail('accounts');
    const response = await api('/api/billing/invoice-payment', {
      method: 'POST',
      cookie,
      body: JSON.stringify({
        purchaseOrder: 'PO-2026/0417',
        billingEmail,
        note: 'Finance office, please quote the PO',
      }),
    });
    expect(response.status).toBe(201);
    const rows = await db.selectFrom('invoice_payment_requests').selectAll().where('trust_id', '=', trustId).execute();
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ purchase_order: 'PO-2026/0417', billing_email: billingEmail, status: 'requested' });
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'entity_id', 'actor_email'])
      .where('trust_id', '=', trustId)
      .where('action', '=', 'billing.invoice_payment_requested')
      .execute();
    expect(audit).toEqual([
      { action: 'billing.invoice_payment_requested', entity_id: rows[0]!.id, actor_email: email },
    ]);
    const mail = await waitForMail(billingEmail, 'pay by invoice');
    expect(mail.text).toContain('PO-2026/0417');
    expect(mail.to.map((t) => t.address)).toContain('billing-ops@airtally.test');
    const page = await (await api('/app/settings/billing', { cookie })).text();
    expect(page).toContain('Invoice payment requested');
    expect(page).toContain('PO-2026/0417');
  });

  it('refuses a request without a purchase-order number in words, storing and sending nothing', async () => {
    const { cookie, trustId } = await activeTrust(1, 1);
    const billingEmail = uniqueEmail('no-po');
    const response = await api('/api/billing/invoice-payment', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ purchaseOrder: '  ', billingEmail }),
    });
    expect(response.status).toBe(400);
    expect(((await response.json()) as { error: { message: string } }).error.message).toContain(
      'purchase-order number',
    );
    const form = await postForm(
      '/api/billing/invoice-payment',
      { purchaseOrder: 'PO 1', billingEmail: 'not-an-address', back: '/app/settings/billing' },
      cookie,
    );
    expect(form.status).toBe(303);
    expect(
      await db.selectFrom('invoice_payment_requests').selectAll().where('trust_id', '=', trustId).execute(),
    ).toEqual([]);
    expect((await listMail()).some((m) => m.to.some((t) => t.address === billingEmail))).toBe(false);
  });
});
