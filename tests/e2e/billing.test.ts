// The upgrade as a trust admin does it in Chromium: billing page → the payments fake's hosted
// checkout → a declined card, then the test card → back in Airtally on the paid plan via the webhook.
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, signInInBrowser } from '../helpers/browser';
import { APP_URL, DEMO_ACCOUNTS } from '../helpers/session';
import { fakeAdmin, verifiedTrust } from '../integration/billing-fixture';
import { testDb } from '../helpers/db';

const SHOTS = join(process.cwd(), '.data', 'screenshots');

describe('billing in Chromium', () => {
  let browser: BrowserContext;
  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('upgrades a trust through the hosted checkout: declined card first, then the test card', async () => {
    const { email, trustId } = await verifiedTrust();
    const page = await browser.newPage();
    await signInInBrowser(page, email);
    await page.goto(`${APP_URL}/app/settings/billing`);
    expect(await page.getByTestId('plan-name').textContent()).toBe('Single School');
    await page.screenshot({ path: join(SHOTS, 'billing-free.png'), fullPage: true });

    await page.getByLabel(/Yearly/).check();
    await Promise.all([
      page.waitForURL(/\/checkout\/cs_test_/),
      page.getByRole('button', { name: 'Continue to payment' }).click(),
    ]);
    expect(await page.locator('body').textContent()).toContain('30-day free trial');

    await page.getByLabel('Card number').fill('4000 0000 0000 0002');
    await page.getByLabel('Expiry (MM / YY)').fill('12 / 34');
    await page.getByLabel('CVC').fill('123');
    await page.getByRole('button', { name: 'Start trial' }).click();
    await expect.poll(() => page.getByTestId('checkout-error').textContent()).toContain('Your card was declined.');
    await page.screenshot({ path: join(SHOTS, 'billing-checkout-declined.png'), fullPage: true });

    await page.getByLabel('Card number').fill('4242 4242 4242 4242');
    await page.getByLabel('Expiry (MM / YY)').fill('12 / 34');
    await page.getByLabel('CVC').fill('123');
    await Promise.all([
      page.waitForURL(/\/app\/settings\/billing\?checkout=success/),
      page.getByRole('button', { name: 'Start trial' }).click(),
    ]);

    // The page refreshes itself until the provider's webhook has put the trust on the paid plan.
    await page.getByText('Whole Estate', { exact: true }).first().waitFor({ timeout: 20_000 });
    expect(await page.getByTestId('plan-name').textContent()).toBe('Whole Estate');
    expect(await page.getByTestId('plan-standing').textContent()).toMatch(/^Free trial until /);
    expect(await page.getByTestId('plan-interval').textContent()).toMatch(/^Yearly/);
    await page.screenshot({ path: join(SHOTS, 'billing-paid.png'), fullPage: true });

    // The trial ends and the first charge fails: every page of the app shows the grace banner.
    const db = testDb();
    const { provider_subscription_id: subscriptionId } = await db
      .selectFrom('billing_accounts')
      .select('provider_subscription_id')
      .where('trust_id', '=', trustId)
      .executeTakeFirstOrThrow();
    await db.destroy();
    await fakeAdmin(`/_fake/subscriptions/${subscriptionId}/renew`, { outcome: 'fail' });
    await expect
      .poll(
        async () => {
          await page.goto(`${APP_URL}/app/schools`);
          return page
            .getByTestId('billing-banner')
            .getAttribute('data-mode', { timeout: 1000 })
            .catch(() => null);
        },
        { timeout: 15_000 },
      )
      .toBe('grace');
    await page.screenshot({ path: join(SHOTS, 'billing-grace-banner.png') });
    await page.close();
  });

  it('shows a viewer the plan read-only, without any way to change it', async () => {
    await browser.clearCookies();
    const page = await browser.newPage();
    await signInInBrowser(page, DEMO_ACCOUNTS.viewer);
    await page.goto(`${APP_URL}/app/settings/billing`);
    expect(await page.getByTestId('plan-name').textContent()).toBe('Whole Estate');
    expect(await page.getByText('Only trust admins can change it.').count()).toBe(1);
    expect(
      await page
        .getByRole('button')
        .filter({ hasText: /payment|Cancel|Resume|Change period/ })
        .count(),
    ).toBe(0);
    await page.close();
  });
});
