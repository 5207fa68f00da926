// Issue 14, item 6 in Chromium: changing the billing period shows the amount and the proration and asks to confirm
// before anything changes; cancelling the confirmation changes nothing; confirming charges the amount shown.
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, seriousAxeViolations, signInInBrowser } from '../helpers/browser';
import { testDb } from '../helpers/db';
import { APP_URL } from '../helpers/session';
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
} from '../integration/billing-fixture';

const SHOTS = join(process.cwd(), '.data', 'screenshots');
const pounds = (pence: number) =>
  new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'GBP' }).format(pence / 100);

describe('billing period change in Chromium', () => {
  let browser: BrowserContext;
  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('shows the amount and proration, changes nothing when cancelled, and charges what it showed when confirmed', async () => {
    const { cookie, email, trustId } = await verifiedTrust();
    await upgrade(cookie);
    expect((await addSchool(cookie)).status).toBe(201);
    expect((await addSchool(cookie)).status).toBe(201);
    const db = testDb();
    const subscriptionId = await subscriptionIdOf(db, trustId);
    await db.destroy();
    await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/renew`, { outcome: 'succeed' });
    await waitUntil('the trial ends', async () => (await billingOf(cookie)).billing.status === 'active');
    await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/backdate`, { days: '9' });
    const stripe = provider();
    const item = (await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!;
    const invoicesBefore = (await stripe.invoices.list({ subscription: subscriptionId })).data.length;

    const page = await browser.newPage();
    await signInInBrowser(page, email);
    await page.goto(`${APP_URL}/app/settings/billing`);
    await page.getByLabel('Billing period').selectOption('year');
    const before = Math.floor(Date.now() / 1000);
    await page.getByRole('button', { name: 'See the price of the change' }).click();
    await page.getByTestId('period-confirm').waitFor();
    const after = Math.ceil(Date.now() / 1000);
    await page.screenshot({ path: join(SHOTS, 'billing-period-confirm.png'), fullPage: true });
    expect(await seriousAxeViolations(page)).toEqual([]);

    // The amount shown, computed here from the provider's period and prices: 2 schools × £240 a year, less the
    // unused part of the month (days remaining ÷ days in the period × 2 × £24).
    const yearly = (await stripe.prices.list({ lookup_keys: ['airtally_whole_estate_yearly'] })).data[0]!;
    const credit = (at: number) =>
      proratedPence(item.price.unit_amount!, 2, item.current_period_start, item.current_period_end, at);
    const dueTexts = new Set([before, after].map((at) => pounds(yearly.unit_amount! * 2 - credit(at))));
    const due = (await page.getByTestId('period-due').textContent())?.trim() ?? '';
    expect(dueTexts.has(due)).toBe(true);
    expect(await page.getByTestId('period-words').textContent()).toContain('charged now');

    // Nothing has changed yet.
    const unchanged = async () => {
      const sub = await stripe.subscriptions.retrieve(subscriptionId);
      expect(sub.items.data[0]!.price.recurring?.interval).toBe('month');
      expect((await stripe.invoices.list({ subscription: subscriptionId })).data.length).toBe(invoicesBefore);
    };
    await unchanged();

    // Cancelling the confirmation changes nothing.
    await page.getByTestId('period-cancel').click();
    await page.waitForURL((url) => url.pathname === '/app/settings/billing' && !url.search.includes('period'));
    expect(await page.getByTestId('period-confirm').count()).toBe(0);
    expect(await page.getByTestId('plan-interval').textContent()).toMatch(/^Monthly/);
    await unchanged();

    // Confirming switches and charges the amount that was shown.
    await page.getByLabel('Billing period').selectOption('year');
    await page.getByRole('button', { name: 'See the price of the change' }).click();
    const shownAgain = (await page.getByTestId('period-due').textContent())?.trim() ?? '';
    await page.getByRole('button', { name: 'Confirm: switch to yearly' }).click();
    await page.getByTestId('notice-ok').waitFor();
    expect(await page.getByTestId('notice-ok').textContent()).toContain('Billing period changed to yearly');
    const changed = await stripe.subscriptions.retrieve(subscriptionId);
    expect(changed.items.data[0]!.price.recurring?.interval).toBe('year');
    const charged = await stripe.invoices.retrieve(String(changed.latest_invoice));
    expect(pounds(charged.amount_due)).toBe(shownAgain);
    // The invoice list shows net, VAT and gross.
    expect(await page.getByTestId('invoices').textContent()).toContain('VAT (20 %)');
    await page.screenshot({ path: join(SHOTS, 'billing-period-changed.png'), fullPage: true });
    expect(await seriousAxeViolations(page)).toEqual([]);

    // The add-school form says what a third school does to the subscription before it is added.
    await page.goto(`${APP_URL}/app/schools`);
    await page.getByRole('button', { name: 'Add a school' }).click();
    const notice = page.getByTestId('school-subscription-change');
    expect(await notice.textContent()).toContain('from 2 schools to 3 schools');
    expect(await notice.textContent()).toContain('a year');
    await page.screenshot({ path: join(SHOTS, 'school-add-subscription-notice.png'), fullPage: true });
    expect((await stripe.subscriptions.retrieve(subscriptionId)).items.data[0]!.quantity).toBe(2);
    await page.close();
  });
});
