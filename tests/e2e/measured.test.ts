import type { BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { launchBrowser, openSignedInPage, seriousAxeViolations, signInInBrowser } from '../helpers/browser';
import { APP_URL, DEMO_ACCOUNTS } from '../helpers/session';
import { dates, longCsv } from '../integration/monitor-logs-fixture';

const SHOTS = process.env.AIRTALLY_TEST_DATA_DIR ?? '/tmp';

describe('measured CO2 in Chromium', () => {
  let browser: BrowserContext;
  const db = testDb();
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
    await db.destroy();
  });

  it('imports a monitor log, follows the analysis, and shows measured days over the prediction on the room page', async () => {
    const room = await db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .select(['rooms.id', 'rooms.code'])
      .where('schools.trust_id', '=', 'demo-trust')
      .where('rooms.use', '=', 'classroom')
      .orderBy('schools.name', 'desc')
      .orderBy('rooms.code', 'desc')
      .executeTakeFirstOrThrow();
    const page = await browser.newPage();
    await signInInBrowser(page, DEMO_ACCOUNTS.estates_manager);
    await page.goto(`${APP_URL}/app/measured`);
    await page.getByTestId('log-files').setInputFiles({
      name: 'classroom monitors.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from(longCsv([room.code, 'Staff room sensor'], dates('2026-02-02', 12), 5)),
    });
    await page.getByTestId('log-preview').waitFor();
    await page.screenshot({ path: `${SHOTS}/measured-preview.png`, fullPage: true });
    expect(await page.getByTestId('log-preview').textContent()).toContain('by room code');
    expect(await page.getByTestId('log-preview').textContent()).toContain('not matched');
    expect(await seriousAxeViolations(page)).toEqual([]);
    await page.getByRole('button', { name: /^Import; leave out 1 sensor without a room/ }).click();
    await page.getByText(/^Imported [\d,]+ readings for 1 room; 1 sensor left out\./).waitFor();
    await page.getByText(/^Last analysed/).waitFor({ timeout: 60_000 });

    await page.goto(`${APP_URL}/app/rooms/${room.id}`);
    await page.getByTestId('measured').waitFor();
    expect(await page.getByTestId('measured').textContent()).toContain('Winter');
    expect(await page.getByTestId('air-change').textContent()).toContain('build-up in lessons');
    await page.getByTestId('measured-chart').first().locator('canvas').first().waitFor();
    await page.getByRole('button', { name: 'Calibrate the model from these readings' }).click();
    await page
      .getByTestId('calibration')
      .getByText(/calibrated from \d+ days of readings/)
      .first()
      .waitFor();
    await page.screenshot({ path: `${SHOTS}/measured-room.png`, fullPage: true });
  });

  it('lets a viewer read measured CO2 but not import it', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.viewer);
    await page.goto(`${APP_URL}/app/measured`);
    await page.getByTestId('comparison').waitFor();
    expect(await page.getByRole('button', { name: 'Choose log files…' }).count()).toBe(0);
    await page.screenshot({ path: `${SHOTS}/measured-viewer.png`, fullPage: true });
    await context.close();
  });
});
