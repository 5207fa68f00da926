// Adding, editing and removing a school from the estate pages, and a first register with schools Airtally does not
// know, in Chromium as the roles concerned; axe-core must find nothing serious on any of the screens.
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, openSignedInPage, seriousAxeViolations, signInInBrowser } from '../helpers/browser';
import { testDb } from '../helpers/db';
import { APP_URL, DEMO_ACCOUNTS, api, createOtherTrust } from '../helpers/session';
import { trustSurvey } from '../unit/register/fixtures';

const SHOTS = process.env.AIRTALLY_TEST_DATA_DIR ?? '/tmp';
const db = testDb();

async function clean(page: Page) {
  expect(await seriousAxeViolations(page)).toEqual([]);
}

describe('a trust admin adds, edits and removes a school', () => {
  let browser: BrowserContext;
  let trust: { cookie: string; email: string; trustId: string };
  beforeAll(async () => {
    browser = await launchBrowser();
    trust = await createOtherTrust();
  });
  afterAll(async () => {
    await browser?.close();
    await db.destroy();
  });

  it('adds a school with a form, edits its phase and plant year, and removes it after saying what goes', async () => {
    const page = await browser.newPage();
    await signInInBrowser(page, trust.email);
    await page.goto(`${APP_URL}/app/schools`);
    await page.getByRole('button', { name: 'Add a school' }).click();
    const form = page.getByTestId('school-form');
    await form.getByLabel('School name').fill('Kestrel Lane Primary');
    await form.getByLabel('Climate region').selectOption('north_west');
    await form.getByLabel('Heating fuel').selectOption('oil');
    await form.getByLabel(/Fuel price/).fill('7.5');
    await form.getByLabel(/School day/).fill('08:50-10:20 lesson\n10:20-10:40 break\n10:40-12:00 lesson');
    await clean(page);
    await page.screenshot({ path: `${SHOTS}/school-add.png`, fullPage: true });
    await form.getByRole('button', { name: 'Add the school' }).click();
    // Either the new school's page, or the form's message saying why not (which fails the test with its words).
    await page.waitForFunction(
      () => /\/app\/schools\/[0-9a-f-]{36}$/.test(location.pathname) || document.querySelector('[role="alert"]'),
    );
    expect(await page.getByRole('alert').allTextContents()).toEqual([]);
    await page.waitForURL(/\/app\/schools\/[0-9a-f-]{36}$/);
    const schoolId = page.url().split('/').pop() as string;
    const stored = await db.selectFrom('schools').selectAll().where('id', '=', schoolId).executeTakeFirstOrThrow();
    expect(stored).toMatchObject({ name: 'Kestrel Lane Primary', climate_region: 'north_west', heating_fuel: 'oil' });
    expect(Number(stored.fuel_price_gbp_per_kwh)).toBeCloseTo(0.075, 9);

    // A block to give a plant year to.
    expect(
      (
        await api('/api/blocks', {
          method: 'POST',
          cookie: trust.cookie,
          body: JSON.stringify({ schoolId, name: 'Main' }),
        })
      ).status,
    ).toBe(201);
    await page.reload();
    await page.getByRole('button', { name: 'Edit school' }).click();
    await page.getByTestId('school-form').getByLabel('Phase').selectOption('all_through');
    await page.getByTestId('school-form').getByLabel('Heating plant year of block Main').fill('1998');
    await clean(page);
    await page.getByRole('button', { name: 'Save changes' }).click();
    await expect
      .poll(
        async () =>
          (await db.selectFrom('schools').select('phase').where('id', '=', schoolId).executeTakeFirst())?.phase,
      )
      .toBe('all_through');
    await expect
      .poll(
        async () =>
          (
            await db
              .selectFrom('blocks')
              .select('heating_installed_year')
              .where('school_id', '=', schoolId)
              .executeTakeFirst()
          )?.heating_installed_year,
      )
      .toBe(1998);
    // The page shows the saved school once the form has reloaded it.
    await page.getByText(/^All-through · North West/).waitFor();
    await page.getByText('plant 1998').waitFor();
    await page.getByRole('button', { name: 'Remove school' }).click();
    const dialog = page.getByTestId('school-removal');
    await dialog.waitFor();
    expect(await dialog.textContent()).toContain('1 block');
    await clean(page);
    await page.screenshot({ path: `${SHOTS}/school-remove.png`, fullPage: true });
    await Promise.all([
      page.waitForURL(/\/app\/schools\?removed=/),
      dialog.getByRole('button', { name: 'Remove Kestrel Lane Primary' }).click(),
    ]);
    expect(await page.getByRole('status').first().textContent()).toContain('Removed Kestrel Lane Primary');
    expect(await db.selectFrom('schools').select('id').where('id', '=', schoolId).execute()).toEqual([]);
    await page.close();
  });

  it('previews a survey with three unknown schools: listed once each, the unknown one asked, then imported', async () => {
    await db
      .insertInto('billing_accounts')
      .values({ trust_id: trust.trustId, plan: 'per_school', status: 'active' })
      .onConflict((oc) => oc.column('trust_id').doUpdateSet({ plan: 'per_school', status: 'active' }))
      .execute();
    const page = await browser.newPage();
    await page.goto(`${APP_URL}/app/register`);
    await page.getByRole('tab', { name: 'Import a register' }).click();
    await page.getByTestId('register-file').setInputFiles({
      name: 'autumn survey.xlsx',
      mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      buffer: await trustSurvey(),
    });
    const list = page.getByTestId('new-schools');
    await list.waitFor();
    expect(await page.getByTestId('import-preview').textContent()).toContain('sheet “Autumn survey”');
    expect(await list.getByRole('rowheader').allTextContents()).toEqual([
      'Hartley High SchoolLS6 2AB',
      'Brookside Infant AcademyM14 5RT',
      'Oakfield Academy',
    ]);
    expect(await list.textContent()).toContain('1 school needs your choice');
    await list.getByLabel('Phase of Oakfield Academy').selectOption('secondary');
    await list.getByRole('button', { name: 'Use these phases and regions' }).click();
    // The file is read again with the choice: the list then says where each value came from.
    await list.getByText('your choice', { exact: true }).first().waitFor();
    expect(await list.textContent()).not.toContain('needs your choice');
    expect(await page.getByTestId('problems-table').textContent()).toContain('Ventilation type blank in 5 rows');
    expect(await page.getByRole('link', { name: /Download the 3 rejected rows/ }).getAttribute('href')).toMatch(
      /\/rejected\.xlsx$/,
    );
    await clean(page);
    await page.screenshot({ path: `${SHOTS}/register-new-schools.png`, fullPage: true });
    await page.getByRole('button', { name: /^Import the 7 changes/ }).click();
    await expect.poll(async () => page.getByTestId('import-outcome').textContent()).toContain('7 rooms created');
    const oakfield = await db
      .selectFrom('schools')
      .select('phase')
      .where('trust_id', '=', trust.trustId)
      .where('name', '=', 'Oakfield Academy')
      .executeTakeFirstOrThrow();
    expect(oakfield.phase).toBe('secondary');

    // An inline edit takes the same units and words as the file.
    await page.getByRole('tab', { name: 'Rooms' }).click();
    await page.getByRole('button', { name: 'Edit Glazing m² of room H01' }).click();
    await page.getByLabel('Glazing m² of room H01').fill('1.6 m2');
    await page.getByLabel('Glazing m² of room H01').press('Enter');
    await expect
      .poll(async () => {
        const rooms = (await (await api('/api/rooms?q=H01', { cookie: trust.cookie })).json()) as {
          rows: { code: string; glazingAreaM2: number | null }[];
        };
        return rooms.rows.find((r) => r.code === 'H01')?.glazingAreaM2;
      })
      .toBe(1.6);
    await page.close();
  });
});

describe('a read-only role', () => {
  it('sees the schools but no way to add, edit or remove one', async () => {
    const { page, context } = await openSignedInPage(DEMO_ACCOUNTS.viewer);
    try {
      await page.goto(`${APP_URL}/app/schools`);
      await page.getByTestId('schools-table').waitFor();
      expect(await page.getByRole('button', { name: 'Add a school' }).count()).toBe(0);
      await page.getByTestId('schools-table').getByRole('link').first().click();
      await page.waitForURL(/\/app\/schools\/[0-9a-f-]{36}$/);
      await page.getByRole('heading', { level: 1 }).waitFor();
      expect(await page.getByRole('button', { name: 'Edit school' }).count()).toBe(0);
      expect(await page.getByRole('button', { name: 'Remove school' }).count()).toBe(0);
      await clean(page);
    } finally {
      await context.close();
    }
  });
});
