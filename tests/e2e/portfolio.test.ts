import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openSignedInPage, seriousAxeViolations } from '../helpers/browser';
import { assess } from '../helpers/assessments';
import { APP_URL, DEMO_ACCOUNTS, api, createOtherTrust, signIn } from '../helpers/session';

// The portfolio pages in Chromium over the demo trust, after a real assessment run of the whole trust.

const SHOTS = join(process.cwd(), '.data', 'screens');

async function setTheme(page: Page, theme: 'light' | 'dark') {
  await page.evaluate((t) => {
    localStorage.setItem('airtally-theme', t);
    document.documentElement.classList.toggle('dark', t === 'dark');
  }, theme);
}

/** Room ids of the table's rows, top to bottom. */
const tableOrder = (page: Page) =>
  page
    .locator('[data-testid="priorities-table"] tbody tr')
    .evaluateAll((rows) => rows.map((r) => r.getAttribute('data-room-id')));

describe('portfolio pages in Chromium', () => {
  let managerCookie: string;

  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    managerCookie = await signIn(DEMO_ACCOUNTS.estates_manager);
    await api('/api/priorities/weights', {
      method: 'PUT',
      cookie: managerCookie,
      body: JSON.stringify({ risk: 0.6, costEffectiveness: 0.3, payback: 0.1 }),
    });
    await assess(managerCookie, { scope: 'trust' }, 120_000);
  });
  afterAll(async () => {
    await api('/api/priorities/weights', {
      method: 'PUT',
      cookie: managerCookie,
      body: JSON.stringify({ risk: 0.6, costEffectiveness: 0.3, payback: 0.1 }),
    });
  });

  it('sends anonymous visitors to sign in', async () => {
    for (const path of ['/app', '/app/priorities', '/app/finance']) {
      const response = await api(path);
      expect(response.status, path).toBe(303);
      expect(response.headers.get('location')).toContain('/sign-in');
    }
  });

  it('shows a viewer the ranked list without the save button, with running totals of what is ticked', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.viewer);
    await page.goto(`${APP_URL}/app/priorities`);
    await page.locator('[data-testid="priorities-table"] tbody tr').first().waitFor();
    expect(await page.getByRole('button', { name: "Save as the trust's weights" }).count()).toBe(0);
    expect(await page.getByText('Only trust admins and estates managers can save weights').count()).toBe(1);
    const ranks = await page.locator('[data-testid="priorities-table"] tbody tr td:nth-child(2)').allTextContents();
    expect(ranks.slice(0, 3)).toEqual(['1', '2', '3']);
    expect(await page.getByRole('note', { name: 'Caution' }).count()).toBeGreaterThan(0);

    // Tick the first two rooms: the totals are their capital and pupils as the API reports them.
    const apiPage = (await (
      await api('/api/priorities?sort=rank&pageSize=2', { cookie: await signIn(DEMO_ACCOUNTS.viewer) })
    ).json()) as { rows: { capitalCostGbp: number | null; pupils: number }[] };
    await page.locator('[data-testid="priorities-table"] tbody tr').nth(0).getByRole('checkbox').check();
    await page.locator('[data-testid="priorities-table"] tbody tr').nth(1).getByRole('checkbox').check();
    const totals = await page.locator('[data-testid="selection-totals"]').textContent();
    const capital = apiPage.rows.reduce((s, r) => s + (r.capitalCostGbp ?? 0), 0);
    const pupils = apiPage.rows.reduce((s, r) => s + r.pupils, 0);
    expect(totals).toContain('2 rooms selected');
    expect(totals).toContain(`£${Math.round(capital).toLocaleString('en-GB')}`);
    expect(totals).toContain(`Pupils helped ${pupils}`);
    await page.screenshot({ path: join(SHOTS, 'priorities-light.png') });
    await context.close();
  });

  it('re-ranks without a reload when an estates manager moves the sliders, and saves the weights', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.estates_manager);
    await page.goto(`${APP_URL}/app/priorities`);
    await page.locator('[data-testid="priorities-table"] tbody tr').first().waitFor();
    const before = await tableOrder(page);
    let navigations = 0;
    page.on('framenavigated', () => (navigations += 1));

    // Keyboard only: payback all the way up, risk and cost-effectiveness all the way down.
    await page.getByLabel('Payback', { exact: false }).first().focus();
    await page.keyboard.press('End');
    await page.getByLabel('Risk', { exact: false }).first().focus();
    await page.keyboard.press('Home');
    await page.getByLabel('Cost-effectiveness', { exact: false }).first().focus();
    await page.keyboard.press('Home');

    const expected = (await (
      await api('/api/priorities?sort=rank&pageSize=50&wRisk=0&wCost=0&wPayback=1', { cookie: managerCookie })
    ).json()) as { rows: { roomId: string }[] };
    await page.waitForFunction(
      (first) =>
        document.querySelector('[data-testid="priorities-table"] tbody tr')?.getAttribute('data-room-id') === first,
      expected.rows[0]!.roomId,
    );
    const after = await tableOrder(page);
    expect(after).toEqual(expected.rows.map((r) => r.roomId));
    expect(after).not.toEqual(before);
    expect(navigations).toBe(0);

    await page.getByRole('button', { name: "Save as the trust's weights" }).click();
    await page.getByText('Saved for the trust.').waitFor();
    await page.reload();
    await page.locator('[data-testid="priorities-table"] tbody tr').first().waitFor();
    expect(await tableOrder(page)).toEqual(after);
    await context.close();
  });

  it('has no serious or critical accessibility violations on the portfolio pages, light or dark', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.trust_admin);
    for (const path of ['/app', '/app/priorities', '/app/finance']) {
      for (const theme of ['light', 'dark'] as const) {
        await page.goto(`${APP_URL}${path}`);
        await setTheme(page, theme);
        if (path === '/app/priorities')
          await page.locator('[data-testid="priorities-table"] tbody tr').first().waitFor();
        if (path === '/app') await page.locator('[data-testid="chart-co2"]').first().waitFor();
        expect(await seriousAxeViolations(page), `${path} (${theme})`).toEqual([]);
      }
    }
    await context.close();
  });

  it('shows a finance lead the money per unit, the baseline in words and the sensitivity with its chart', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.finance_lead);
    await page.goto(`${APP_URL}/app/finance`);
    const report = (await (await api('/api/finance', { cookie: await signIn(DEMO_ACCOUNTS.finance_lead) })).json()) as {
      totals: { units: number };
      schools: { units: unknown[] }[];
    };
    expect(report.totals.units).toBeGreaterThan(0);
    expect(await page.locator('[data-testid="finance-school-table"] tbody tr').count()).toBe(report.totals.units);
    // Schools are folded to their subtotals; opening one shows its units.
    const firstSchool = page.locator('[data-testid="finance-school"]').first();
    expect(await firstSchool.locator('tbody tr').first().isVisible()).toBe(false);
    await firstSchool.locator('summary').click();
    expect(await firstSchool.locator('tbody tr').first().isVisible()).toBe(true);
    expect(await page.locator('[data-testid="baseline-words"]').textContent()).toContain('discount rate');
    expect(await page.locator('[data-testid="sensitivity-energy"] tbody tr').count()).toBe(7);
    expect(await page.getByRole('button', { name: 'Re-run assessment' }).count()).toBe(1);
    expect(await page.getByRole('link', { name: 'Change financial assumptions' }).getAttribute('href')).toBe(
      '/app/settings/assumptions',
    );
    await page.locator('[data-testid="chart-sensitivity"]').scrollIntoViewIfNeeded();
    await page.locator('[data-testid="chart-sensitivity"] canvas').first().waitFor({ timeout: 20_000 });
    await page.screenshot({ path: join(SHOTS, 'finance-light.png') });
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: join(SHOTS, 'finance-top-light.png') });
    await setTheme(page, 'dark');
    await page.screenshot({ path: join(SHOTS, 'finance-dark.png') });
    await context.close();
  });

  it('shows the dashboard figures and loads each chart only when it scrolls into view, with a table alternative', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.trust_admin);
    const chartRequests: string[] = [];
    page.on('request', (r) => r.url().includes('PortfolioChart') && chartRequests.push(r.url()));
    await page.setViewportSize({ width: 900, height: 500 });
    await page.goto(`${APP_URL}/app`);
    const headline = await page.locator('[data-testid="headline"]').textContent();
    expect(headline).toContain('Rooms assessed');
    // Once the page has settled (no request for half a second), no chart has been fetched above the fold's end.
    await page.waitForLoadState('networkidle');
    expect(chartRequests).toEqual([]);
    await page.evaluate(() => window.scrollTo(0, 400));
    await page.locator('[data-testid="chart-co2"] canvas').first().waitFor({ timeout: 20_000 });
    expect(chartRequests.length).toBeGreaterThan(0);
    await page.getByText('Show these figures as a table').first().click();
    expect(await page.locator('figure table tbody tr').first().isVisible()).toBe(true);
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight));
    await page.locator('[data-testid="chart-cumulative"] canvas').first().waitFor({ timeout: 20_000 });
    await page.screenshot({ path: join(SHOTS, 'dashboard-light.png') });
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.screenshot({ path: join(SHOTS, 'dashboard-top-light.png') });
    await setTheme(page, 'dark');
    await page.locator('html.dark').waitFor({ state: 'attached' });
    await page.screenshot({ path: join(SHOTS, 'dashboard-dark.png') });
    await context.close();
  });

  it("tells another trust's admin what to do next on its empty portfolio", async () => {
    const other = await createOtherTrust();
    const { page, context } = await openSignedInPage(other.email);
    for (const path of ['/app', '/app/priorities', '/app/finance']) {
      await page.goto(`${APP_URL}${path}`);
      expect(await page.getByRole('link', { name: 'Import your register' }).count(), path).toBeGreaterThan(0);
    }
    await context.close();
  });

  it('fits a tablet held upright', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.estates_manager);
    await page.setViewportSize({ width: 768, height: 1024 });
    await page.goto(`${APP_URL}/app/priorities`);
    await page.locator('[data-testid="priorities-table"] tbody tr').first().waitFor();
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await setTheme(page, 'dark');
    await page.screenshot({ path: join(SHOTS, 'priorities-tablet-dark.png') });
    await context.close();
  });
});
