// A new trust's first register: title rows, three schools Airtally does not know and whose phase the sheet never
// gives, bad rows and notes under the data. Imported through the running app and its real database.
import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { commit as commitAs, upload } from '../helpers/imports';

const commit = (cookie: string, id: string) => commitAs(cookie, id, { rows: 'valid' });
import { api, createOtherTrust } from '../helpers/session';
import { TRUST_SURVEY_EXPECTED as EXPECTED, trustSurvey } from '../unit/register/fixtures';

const db = testDb();
afterAll(() => db.destroy());

/** A trust of its own on the per-school plan, so a register may create several schools. */
async function payingTrust() {
  const trust = await createOtherTrust();
  await db
    .insertInto('billing_accounts')
    .values({ trust_id: trust.trustId, plan: 'per_school', status: 'active' })
    .onConflict((oc) => oc.column('trust_id').doUpdateSet({ plan: 'per_school', status: 'active' }))
    .execute();
  return trust;
}

const schoolsOf = (trustId: string) =>
  db
    .selectFrom('schools')
    .select(['id', 'name', 'phase', 'climate_region', 'address'])
    .where('trust_id', '=', trustId)
    .orderBy('name')
    .execute();
const roomCodesOf = async (trustId: string) =>
  (
    await db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .select('rooms.code')
      .where('schools.trust_id', '=', trustId)
      .orderBy('rooms.code')
      .execute()
  ).map((r) => r.code);

describe('a new trust imports its surveyors’ sheet', () => {
  let admin: { cookie: string; trustId: string };
  beforeAll(async () => {
    admin = await payingTrust();
  });

  it('previews the sheet by its own name, lists the three new schools once and the problems at their rows', async () => {
    const { status, body } = await upload(admin.cookie, 'autumn survey.xlsx', await trustSurvey());
    expect(status).toBe(201);
    expect(body.sheetName).toBe(EXPECTED.sheetName);
    expect(body.header.row).toBe(EXPECTED.headerRow);
    expect(body.summary).toMatchObject({ schoolsToCreate: 3, roomsToCreate: 7, rowsRejected: 3 });
    expect(body.newSchools.map((s: { name: string }) => s.name).sort()).toEqual(
      Object.keys(EXPECTED.newSchools).sort(),
    );
    const errors = body.problems.filter((p: { severity: string }) => p.severity === 'error');
    expect(Object.fromEntries(errors.map((e: { row: number; column: string }) => [e.row, e.column]))).toEqual(
      EXPECTED.rejected,
    );
    const ventilation = body.problems.filter((p: { column: string }) => p.column === 'Ventilation');
    expect(ventilation.map((p: { rows: number[] }) => p.rows)).toEqual([EXPECTED.ventilationBlankRows]);
    expect(body.hasRejectedRows).toBe(true);
    // Nothing is written before the commit.
    expect(await schoolsOf(admin.trustId)).toEqual([]);
  });

  it('imports the valid rows with the phase chosen in the preview, and the rejected rows round-trip', async () => {
    const chosen = JSON.stringify({ 'Oakfield Academy': { phase: 'secondary', climateRegion: 'north_west' } });
    const { body: preview } = await upload(admin.cookie, 'autumn survey.xlsx', await trustSurvey(), {
      schools: chosen,
    });
    const committed = await commit(admin.cookie, preview.id);
    expect(committed.status).toBe(200);
    expect(committed.body.outcome).toMatchObject({ schoolsCreated: 3, roomsCreated: 7, rowsRejected: 3 });
    expect(await schoolsOf(admin.trustId)).toEqual([
      expect.objectContaining({ name: 'Brookside Infant Academy', phase: 'primary', climate_region: 'north_west' }),
      expect.objectContaining({
        name: 'Hartley High School',
        phase: 'secondary',
        climate_region: 'north_east',
        address: 'LS6 2AB',
      }),
      expect.objectContaining({ name: 'Oakfield Academy', phase: 'secondary', climate_region: 'north_west' }),
    ]);
    expect(await roomCodesOf(admin.trustId)).toEqual(['B01', 'B03', 'H01', 'H02', 'H04', 'O01', 'O02']);

    // The rejected rows come back as a workbook under the file's own header, with what to fix.
    const download = await api(`/api/imports/${preview.id}/rejected.xlsx`, { cookie: admin.cookie });
    expect(download.status).toBe(200);
    expect(download.headers.get('content-type')).toContain('spreadsheetml');
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(await download.arrayBuffer());
    const sheet = wb.worksheets[0] as ExcelJS.Worksheet;
    expect(sheet.name).toBe(EXPECTED.sheetName);
    const header = (sheet.getRow(1).values as unknown[]).slice(1);
    expect(header).toEqual([
      'School',
      'Postcode',
      'Block',
      'Room',
      'Room name',
      'Use',
      'Area (m2)',
      'Height (m)',
      'Pupils',
      'Ventilation',
      'What to fix',
    ]);
    expect(sheet.rowCount).toBe(4);
    const fixOf = (row: number) => String(sheet.getRow(row).getCell(11).value);
    expect(fixOf(2)).toMatch(/^Row 6 of the file: .*"big" is not a number/);
    expect(fixOf(3)).toMatch(/^Row 9 of the file: .*room code is missing/i);
    expect(fixOf(4)).toMatch(/^Row 13 of the file: .*appears again/);

    // Fix them as a person would: an area, a code, a new code for the repeated one; then upload the workbook.
    sheet.getRow(2).getCell(7).value = 61;
    sheet.getRow(3).getCell(4).value = 'B02';
    sheet.getRow(4).getCell(4).value = 'O03';
    const fixed = Buffer.from(await wb.xlsx.writeBuffer());
    const again = await upload(admin.cookie, 'rejected rows fixed.xlsx', fixed);
    expect(again.status).toBe(201);
    expect(again.body.summary).toMatchObject({ rowsRejected: 0, roomsToCreate: 3, schoolsToCreate: 0 });
    expect(again.body.problems.filter((p: { severity: string }) => p.severity === 'error')).toEqual([]);
    expect((await commit(admin.cookie, again.body.id)).status).toBe(200);
    expect(await roomCodesOf(admin.trustId)).toEqual([
      'B01',
      'B02',
      'B03',
      'H01',
      'H02',
      'H03',
      'H04',
      'O01',
      'O02',
      'O03',
    ]);
    const h03 = await db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .select('rooms.floor_area_m2')
      .where('schools.trust_id', '=', admin.trustId)
      .where('rooms.code', '=', 'H03')
      .executeTakeFirstOrThrow();
    expect(Number(h03.floor_area_m2)).toBe(61);
  });

  it('refuses choices for new schools that are not phases or regions, in words', async () => {
    const { status, body } = await upload(admin.cookie, 'autumn survey.xlsx', await trustSurvey(), {
      schools: JSON.stringify({ 'Oakfield Academy': { phase: 'kindergarten' } }),
    });
    expect(status).toBe(400);
    expect(body.error.message).toMatch(/phase must be one of: nursery, primary/);
  });

  it('answers 404 in words for the rejected rows of an import that rejected none', async () => {
    const clean = new ExcelJS.Workbook();
    const ws = clean.addWorksheet('Rooms');
    ws.addRow(['School', 'Room code', 'Floor area (m2)']);
    ws.addRow(['Hartley High School', 'H09', 40]);
    const { body } = await upload(admin.cookie, 'one room.xlsx', Buffer.from(await clean.xlsx.writeBuffer()));
    const response = await api(`/api/imports/${body.id}/rejected.xlsx`, { cookie: admin.cookie });
    expect(response.status).toBe(404);
    expect(((await response.json()) as any).error.message).toBe(
      'That import rejected no rows, so there is nothing to download.',
    );
  });
});
