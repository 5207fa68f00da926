import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, signInInBrowser } from '../helpers/browser';
import { APP_URL, DEMO_ACCOUNTS, api, createOtherTrust } from '../helpers/session';
import { messyRegister } from '../unit/register/fixtures';

const SHOTS = process.env.AIRTALLY_TEST_DATA_DIR ?? '/tmp';

/** The room with that code, as the API has it now. */
async function roomByCode(cookie: string, code: string) {
  const page = (await (await api(`/api/rooms?q=${encodeURIComponent(code)}&pageSize=10`, { cookie })).json()) as {
    rows: { code: string; pupils: number; ventilationType: string }[];
  };
  return page.rows.find((r) => r.code === code);
}

const row = (page: Page, code: string) => page.locator(`[data-testid="register-table"] tr[data-room-code="${code}"]`);

describe('the register page in Chromium', () => {
  let browser: BrowserContext;
  let trust: { cookie: string; email: string };
  beforeAll(async () => {
    browser = await launchBrowser();
    trust = await createOtherTrust();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it('imports a messy register: preview with problems by row, then commit of the valid rows', async () => {
    const page = await browser.newPage();
    await signInInBrowser(page, trust.email);
    await page.goto(`${APP_URL}/app/register`);
    await page.getByRole('tab', { name: 'Import a register' }).click();
    await page.getByTestId('register-file').setInputFiles({
      name: 'fernhill survey.xlsx',
      mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      buffer: await messyRegister(),
    });
    await page.getByTestId('import-preview').waitFor();
    expect(await page.getByTestId('summary-roomsToCreate').textContent()).toBe('5');
    expect(await page.getByTestId('summary-rowsRejected').textContent()).toBe('5');
    const problems = await page.getByTestId('problems-table').textContent();
    expect(problems).toContain('Openable area');
    expect(problems).toMatch(/13J · Free area/);
    await page.screenshot({ path: `${SHOTS}/register-preview.png`, fullPage: true });
    await page.getByRole('button', { name: /^Import the 5 changes/ }).click();
    await expect.poll(async () => page.getByTestId('import-outcome').textContent()).toContain('5 rooms created');
    expect((await roomByCode(trust.cookie, 'G01'))?.pupils).toBe(30);
    await page.getByRole('tab', { name: 'Import history' }).click();
    expect(await page.getByTestId('import-history').textContent()).toContain('fernhill survey.xlsx');
    await page.close();
  });

  it('edits inline, refuses an impossible value, rolls back a refused change and bulk-edits selected rooms', async () => {
    const page = await browser.newPage();
    await page.goto(`${APP_URL}/app/register`);
    await row(page, 'G01').waitFor();

    await page.getByRole('button', { name: 'Edit Pupils of room G01' }).click();
    await page.getByRole('textbox', { name: 'Pupils of room G01' }).fill('25');
    await page.keyboard.press('Enter');
    await expect.poll(async () => (await roomByCode(trust.cookie, 'G01'))?.pupils).toBe(25);

    // Openable larger than glazing is refused before sending, as on import.
    await page.getByRole('button', { name: 'Edit Openable m² of room G01' }).click();
    await page.getByRole('textbox', { name: 'Openable m² of room G01' }).fill('99');
    await page.keyboard.press('Enter');
    expect(await page.getByRole('status').first().textContent()).toMatch(/larger than the glazing area/);

    // A duplicate code passes the form but the server refuses it: the table rolls back.
    await page.getByRole('button', { name: 'Edit Room code of room G01' }).click();
    await page.getByRole('textbox', { name: 'Room code of room G01' }).fill('G02');
    await page.keyboard.press('Enter');
    await expect.poll(async () => page.getByRole('status').first().textContent()).toMatch(/was not changed: .*unique/);
    await expect.poll(async () => row(page, 'G01').count()).toBe(1);

    await page.getByRole('checkbox', { name: 'Select room G01' }).check();
    await page.getByRole('checkbox', { name: 'Select room G02' }).check();
    await page.getByLabel('Set ventilation of selected rooms').selectOption('heat_recovery_unit');
    await expect.poll(async () => (await roomByCode(trust.cookie, 'G02'))?.ventilationType).toBe('heat_recovery_unit');
    expect((await roomByCode(trust.cookie, 'G01'))?.ventilationType).toBe('heat_recovery_unit');
    await page.screenshot({ path: `${SHOTS}/register-table.png`, fullPage: true });
    await page.close();
  });

  it('edits a block on the schools and blocks tab', async () => {
    const page = await browser.newPage();
    await page.goto(`${APP_URL}/app/register`);
    await page.getByRole('tab', { name: 'Schools and blocks' }).click();
    await page.getByTestId('blocks-table').waitFor();
    await page.getByRole('button', { name: 'Edit Year built of block Main' }).click();
    await page.getByRole('textbox', { name: 'Year built of block Main' }).fill('1972');
    await page.keyboard.press('Enter');
    await expect.poll(async () => page.getByRole('status').first().textContent()).toBe('Saved.');
    const schools = (await (await api('/api/schools', { cookie: trust.cookie })).json()) as {
      schools: { id: string }[];
    };
    const school = (await (await api(`/api/schools/${schools.schools[0]!.id}`, { cookie: trust.cookie })).json()) as {
      school: { blocks: { name: string; yearBuilt: number }[] };
    };
    expect(school.school.blocks.find((b) => b.name === 'Main')?.yearBuilt).toBe(1972);
    await page.close();
  });

  it('shows a viewer the register and exports, but no import or edit controls', async () => {
    const viewerBrowser = await launchBrowser();
    const page = await viewerBrowser.newPage();
    await signInInBrowser(page, DEMO_ACCOUNTS.viewer);
    await page.goto(`${APP_URL}/app/register`);
    await page.locator('[data-testid="register-table"] tbody tr').first().waitFor();
    expect(await page.getByRole('tab', { name: 'Import a register' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /^Edit / }).count()).toBe(0);
    expect(await page.getByRole('checkbox').count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Add a room' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Export .xlsx' }).count()).toBe(1);
    await viewerBrowser.close();
  });
});
