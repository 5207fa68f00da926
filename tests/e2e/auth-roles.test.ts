import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, signInInBrowser } from '../helpers/browser';
import { APP_URL, DEMO_ACCOUNTS, type DemoRole } from '../helpers/session';

// What each role may do on the members page, from the roles table in the product brief.
const MAY_MANAGE_MEMBERS: Record<DemoRole, boolean> = {
  trust_admin: true,
  estates_manager: false,
  finance_lead: false,
  viewer: false,
};

describe('signing in as each demo role in Chromium', () => {
  let browser: BrowserContext;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('sends an anonymous visitor to sign-in and back to the page they asked for', async () => {
    const page = await browser.newPage();
    await page.goto(`${APP_URL}/app/settings/members`);
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    await page.getByLabel('E-mail address').fill(DEMO_ACCOUNTS.viewer);
    await page.getByLabel('Password').fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    expect(await page.getByRole('alert').textContent()).toContain('do not match');
    await page.getByLabel('Password').fill('airtally-demo-2026');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(`${APP_URL}/app/settings/members`);
    await page.close();
    await browser.clearCookies();
  });

  for (const role of Object.keys(DEMO_ACCOUNTS) as DemoRole[]) {
    it(`shows a ${role.replace('_', ' ')} only what the role may do`, async () => {
      const page = await browser.newPage();
      await signInInBrowser(page, DEMO_ACCOUNTS[role]);
      expect(await page.getByTestId('active-role').textContent()).toBe(role.replace('_', ' '));
      expect(await page.getByTestId('active-trust').textContent()).toBe('Brackenmoor Valley Learning Trust');

      await page.goto(`${APP_URL}/app/settings/members`);
      const rows = await page.locator('[data-testid="members-table"] tbody tr').count();
      expect(rows).toBeGreaterThanOrEqual(4);
      expect(await page.getByTestId('invite-form').count()).toBe(MAY_MANAGE_MEMBERS[role] ? 1 : 0);
      expect(await page.getByText('Change', { exact: true }).count()).toBe(MAY_MANAGE_MEMBERS[role] ? rows : 0);
      expect(await page.getByRole('button', { name: 'Remove' }).count()).toBe(MAY_MANAGE_MEMBERS[role] ? rows - 1 : 0);

      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL((url) => url.pathname === '/sign-in');
      await page.goto(`${APP_URL}/app/schools`);
      expect(new URL(page.url()).pathname).toBe('/sign-in');
      await page.close();
    });
  }
});
