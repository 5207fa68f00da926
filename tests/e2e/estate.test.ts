import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_SCHOOLS } from '../../scripts/seed/demo-trust';
import { launchBrowser, signInInBrowser } from '../helpers/browser';
import { APP_URL, DEMO_ACCOUNTS } from '../helpers/session';

describe('estate overview in Chromium', () => {
  let browser: BrowserContext;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('shows every school of the demo trust and opens a school and a room', async () => {
    const page = await browser.newPage();
    await signInInBrowser(page, DEMO_ACCOUNTS.viewer);
    await page.goto(`${APP_URL}/app/schools`);
    const names = await page.locator('[data-testid="schools-table"] tbody th a').allTextContents();
    expect(names.sort()).toEqual(DEMO_SCHOOLS.map((s) => s.name).sort());

    await page.getByRole('link', { name: 'Thistlegate Primary School' }).click();
    await page.waitForURL(/\/app\/schools\/[0-9a-f-]+$/);
    expect(await page.getByRole('heading', { level: 1 }).textContent()).toBe('Thistlegate Primary School');
    await page.locator('[data-testid="rooms-table"] tbody a').first().click();
    await page.waitForURL(/\/app\/rooms\/[0-9a-f-]+$/);
    expect(await page.locator('[data-testid="room-attributes"]').textContent()).toContain('Floor area');
    await page.close();
  });
});
