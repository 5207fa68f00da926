import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSignedInPage, seriousAxeViolations } from '../helpers/browser';
import { pdfPages } from '../helpers/pdf';
import { assess } from '../helpers/assessments';
import { DEMO_ACCOUNTS, signIn } from '../helpers/session';
import type { BrowserContext, Page } from 'playwright-core';

// An estates manager builds a programme for the demo trust in Chromium, moves a room to another year, saves a
// scenario with more money, compares the two, and downloads the workbook and the board report.

const SHOTS = join(process.cwd(), '.data', 'screens');

/** Waits until the named island has hydrated (typing into its server-rendered HTML before then is lost). */
const hydrated = (page: Page, component: string) =>
  page.locator(`astro-island[component-url*="${component}"]:not([ssr])`).first().waitFor({ timeout: 20_000 });
const NAME = `Board plan ${Date.now()}`;

/** Runs a trust-wide assessment of the demo trust and waits for it (throws if it fails or takes over 3 minutes). */
const assessDemoTrust = (cookie: string) => assess(cookie, { scope: 'trust' }, 180_000);

describe('capital programme in Chromium', () => {
  let context: BrowserContext;
  let page: Page;

  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    await assessDemoTrust(await signIn(DEMO_ACCOUNTS.estates_manager));
    ({ page, context } = await openSignedInPage(DEMO_ACCOUNTS.estates_manager));
  });
  afterAll(async () => {
    await context?.close();
  });

  it('builds a programme from the settings form', async () => {
    await page.goto('/app/programme');
    await page.getByRole('link', { name: 'Programme', exact: true }).waitFor();
    await page.getByTestId('new-programme').click();
    await hydrated(page, 'SettingsForm');
    await page.getByLabel('Programme name').fill(NAME);
    await page.getByLabel('Number of years (1–10)').fill('3');
    for (const n of [1, 2, 3]) await page.locator(`input[name="budget-${n}"]`).fill('150000');
    await expect(page.getByTestId('on-cost-example').textContent()).resolves.toContain(
      '£10,000 of units costs £13,552',
    );
    await page.screenshot({ path: join(SHOTS, 'programme-new.png'), fullPage: true });
    await Promise.all([
      page.waitForURL(/\/app\/programme\/[0-9a-f-]{36}$/),
      page.getByRole('button', { name: 'Make the plan' }).click(),
    ]);
    await expect(page.getByTestId('programme-name').textContent()).resolves.toBe(NAME);
    await hydrated(page, 'ProgrammeView');
    await expect(page.getByTestId('programme-year').count()).resolves.toBe(3);
    const capital = await page.getByTestId('total-capital').textContent();
    expect(capital).toMatch(/of £450,000$/);
    await page.getByTestId('programme-chart').locator('canvas').first().waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: join(SHOTS, 'programme-page.png'), fullPage: true });
  });

  it('moves a room to the last year by hand and says what it cost', async () => {
    const firstRoom = page.locator('[data-testid="programme-year"]').first().getByTestId('programme-room').first();
    const code = await firstRoom.getAttribute('data-room-code');
    await firstRoom.getByTestId('move-year').selectOption({ index: 2 });
    await firstRoom.getByTestId('pin-room').click();
    const message = page.getByTestId('programme-message');
    await message.waitFor();
    await expect(message.textContent()).resolves.toMatch(
      new RegExp(`^Pinned ${code} .* to 2029/30\\. The budgets and windows still hold`),
    );
    const lastYear = page.locator('[data-testid="programme-year"]').nth(2);
    await lastYear.locator('summary').click();
    await lastYear.locator(`[data-room-code="${code}"]`).getByText('pinned').waitFor();
  });

  it('downloads the programme workbook and a board report that opens as a paginated PDF', async () => {
    const [xlsx] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-xlsx').click()]);
    expect(xlsx.suggestedFilename()).toBe(`${NAME}.xlsx`);
    const [pdf] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-pdf').click()]);
    const path = await pdf.path();
    const { readFileSync } = await import('node:fs');
    const pages = await pdfPages(readFileSync(path));
    expect(pages.length).toBeGreaterThanOrEqual(3);
    expect(pages[0]).toContain(`Capital programme: ${NAME}`);
    expect(pages.join(' ')).toContain('Figure 2. Pupil-hours of poor air removed a year');
  });

  it('saves a scenario with more money and compares the two in one table and one chart', async () => {
    await page.getByRole('link', { name: 'Save as a new scenario' }).click();
    await hydrated(page, 'SettingsForm');
    await page.getByLabel('Programme name').fill(`${NAME} more money`);
    for (const n of [1, 2, 3]) await page.locator(`input[name="budget-${n}"]`).fill('300000');
    await Promise.all([
      page.waitForURL(/\/app\/programme\/[0-9a-f-]{36}$/),
      page.getByRole('button', { name: 'Make the plan' }).click(),
    ]);
    await page.goto('/app/programme');
    for (const name of [NAME, `${NAME} more money`]) await page.getByLabel(`Compare ${name}`, { exact: true }).check();
    await Promise.all([page.waitForURL(/\/app\/programme\/compare/), page.getByTestId('compare-button').click()]);
    const headers = await page.locator('[data-testid="comparison"] thead th').allTextContents();
    expect(headers.slice(1).sort()).toEqual([NAME, `${NAME} more money`]);
    // The chart loads when it scrolls into view.
    await page.getByTestId('programme-chart').scrollIntoViewIfNeeded();
    await page.getByTestId('programme-chart').locator('canvas').first().waitFor();
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.screenshot({ path: join(SHOTS, 'programme-compare.png'), fullPage: true });
  });

  it('lets a viewer read the programme without the controls that change it', async () => {
    const viewer = await openSignedInPage(DEMO_ACCOUNTS.viewer);
    try {
      await viewer.page.goto('/app/programme');
      await viewer.page.getByRole('link', { name: NAME, exact: true }).click();
      await viewer.page.getByTestId('programme-totals').waitFor();
      await expect(viewer.page.getByTestId('pin-room').count()).resolves.toBe(0);
      await expect(viewer.page.getByRole('link', { name: 'Change settings' }).count()).resolves.toBe(0);
      await expect(viewer.page.getByTestId('new-programme').count()).resolves.toBe(0);
    } finally {
      await viewer.context.close();
    }
  });
});
