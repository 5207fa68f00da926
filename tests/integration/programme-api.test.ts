import ExcelJS from 'exceljs';
import { sql, type Kysely } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Database } from '../../db/database';
import { testDb } from '../helpers/db';
import { pdfPages } from '../helpers/pdf';
import { DEMO_PASSWORD, api, createOtherTrust, signUp, uniqueEmail } from '../helpers/session';
import { dropFixtureTrust, insertAssessedRooms, type Fixture } from './portfolio-fixture';

// A fresh trust (signed up through the app) with 3 schools × 15 invented assessed rooms. Budgets, capacity and
// on-costs are checked here from the raw rows and the rates, worked out independently of the app.

const RATES = {
  preliminariesRate: 0.1,
  feesRate: 0.12,
  contingencyRate: 0.1,
  inflationRatePerYear: 0.035,
  vatRate: 0.2,
  vatRecoverable: true,
};
/** NRM 1 order by hand: ×1.1 preliminaries, ×1.12 fees, ×1.1 contingency, ×1.035 per year after the first (VAT recovered). */
const factor = (year: number) => 1.1 * 1.12 * 1.1 * 1.035 ** (year - 1);
const settings = (over: Record<string, unknown> = {}) => ({
  yearConvention: 'sep_aug',
  firstYear: 2027,
  budgetsGbp: [60_000, 60_000, 60_000],
  onCosts: RATES,
  windows: [
    { id: 'october', workingDays: 5 },
    { id: 'february', workingDays: 5 },
    { id: 'easter', workingDays: 8 },
    { id: 'summer', workingDays: 25 },
  ],
  unitsPerWorkingDay: 1,
  mobilisationGbp: 2000,
  ...over,
});

interface RoomLine {
  roomId: string;
  schoolId: string;
  schoolName: string;
  year: number;
  windowId: string;
  units: number;
}
interface View {
  id: string;
  name: string;
  canEdit: boolean;
  report: {
    years: { year: number; windows: { windowId: string; schools: { schoolId: string; rooms: RoomLine[] }[] }[] }[];
    totals: { rooms: number; capitalGbp: number };
    solve: { gapPct: number; bound: number; objective: number; words: string };
    misses: { roomId: string; reason: string; words: string }[];
  };
}
const roomsOf = (v: View) => v.report.years.flatMap((y) => y.windows.flatMap((w) => w.schools.flatMap((s) => s.rooms)));

describe('capital programme API', () => {
  let db: Kysely<Database>;
  let admin: { cookie: string; trustId: string; email: string };
  let fixture: Fixture;
  const installed = new Map<string, number>();
  let viewer: string;
  let limited: string;

  async function member(role: string, schoolIds: string[] | null): Promise<string> {
    const email = uniqueEmail(role);
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin.cookie,
      body: JSON.stringify({ email, role, ...(schoolIds ? { schoolIds } : {}) }),
    });
    expect(invite.status, await invite.clone().text()).toBe(201);
    const { invitation } = (await invite.json()) as { invitation: { id: string } };
    return signUp({ name: role, email, password: DEMO_PASSWORD, invitationId: invitation.id });
  }
  const create = async (body: unknown, cookie = admin.cookie) =>
    api('/api/programmes', { method: 'POST', cookie, body: JSON.stringify(body) });

  beforeAll(async () => {
    db = testDb();
    admin = await createOtherTrust();
    // Inviting needs a confirmed address; this admin signed up a moment ago.
    await sql`UPDATE "user" SET "emailVerified" = true WHERE email = ${admin.email}`.execute(db);
    fixture = await insertAssessedRooms(db, {
      trustId: admin.trustId,
      createTrust: false,
      schools: 3,
      roomsPerSchool: 15,
      label: 'Programme API',
    });
    // The fixture's results carry no pupil-hours removed: give each retrofit 80 % of the room's exposure.
    await sql`UPDATE room_results SET pupil_hours_removed = pupil_hours_above * 0.8
      WHERE run_id = ${fixture.runId}::uuid AND unit_count > 0`.execute(db);
    const rows = await db
      .selectFrom('current_room_results')
      .select(['room_id', 'capital_cost_gbp'])
      .where('trust_id', '=', admin.trustId)
      .where('unit_count', '>', 0)
      .execute();
    for (const r of rows) installed.set(r.room_id, r.capital_cost_gbp ?? 0);
    viewer = await member('viewer', null);
    limited = await member('estates_manager', [fixture.schoolIds[0]!]);
  });
  afterAll(async () => {
    await dropFixtureTrust(db, admin.trustId);
    await db.destroy();
  });

  it('plans a programme that keeps every year’s capital and every window, and audits it', async () => {
    const response = await create({ name: 'Three years', settings: settings() });
    expect(response.status, await response.clone().text()).toBe(201);
    const { programme } = (await response.json()) as { programme: View };
    const rooms = roomsOf(programme);
    expect(rooms.length).toBeGreaterThan(3);
    // Spend per year worked out here: installed cost × factor, plus one mobilisation per school and window.
    const spend = [0, 0, 0];
    const units = new Map<string, number>();
    const visits = new Set<string>();
    for (const r of rooms) {
      spend[r.year - 1]! += installed.get(r.roomId)! * factor(r.year);
      const key = `${r.year}:${r.windowId}`;
      units.set(key, (units.get(key) ?? 0) + r.units);
      if (!visits.has(`${key}:${r.schoolId}`)) {
        visits.add(`${key}:${r.schoolId}`);
        spend[r.year - 1]! += 2000 * factor(r.year);
      }
    }
    for (const s of spend) expect(s).toBeLessThanOrEqual(60_000 + 1e-6);
    const days: Record<string, number> = { october: 5, february: 5, easter: 8, summer: 25 };
    for (const [key, u] of units) expect(u).toBeLessThanOrEqual(days[key.split(':')[1]!]!);
    expect(programme.report.solve.bound).toBeGreaterThanOrEqual(programme.report.solve.objective);
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'actor_email'])
      .where('entity_id', '=', programme.id)
      .execute();
    expect(audit).toEqual([{ action: 'programme.create', actor_email: admin.email }]);
  });

  it('refuses settings that make no sense with a message, and saves nothing', async () => {
    const before = await db.selectFrom('programmes').select('id').where('trust_id', '=', admin.trustId).execute();
    const response = await create({ name: 'Bad', settings: settings({ budgetsGbp: [] }) });
    expect(response.status).toBe(400);
    expect(((await response.json()) as { error: { message: string } }).error.message).toMatch(/at least one year/);
    const duplicate = await create({ name: 'Three years', settings: settings() });
    expect(duplicate.status).toBe(409);
    const after = await db.selectFrom('programmes').select('id').where('trust_id', '=', admin.trustId).execute();
    expect(after).toHaveLength(before.length);
  });

  it('moves a room to another year by hand, re-checks the budgets and says what it cost', async () => {
    const { programme } = (await (await create({ name: 'To edit', settings: settings() })).json()) as {
      programme: View;
    };
    const room = roomsOf(programme).find((r) => r.year === 1)!;
    const response = await api(`/api/programmes/${programme.id}/edits`, {
      method: 'POST',
      cookie: admin.cookie,
      body: JSON.stringify({ action: 'pin', roomId: room.roomId, year: 3 }),
    });
    expect(response.status, await response.clone().text()).toBe(200);
    const body = (await response.json()) as {
      programme: View;
      impact: { words: string; valueBefore: number; valueAfter: number };
    };
    expect(roomsOf(body.programme).find((r) => r.roomId === room.roomId)?.year).toBe(3);
    expect(body.impact.words).toMatch(/^Pinned .* to 2029\/30\. The budgets and windows still hold/);
    const audit = await db.selectFrom('audit_events').select('action').where('entity_id', '=', programme.id).execute();
    expect(audit.map((a) => a.action).sort()).toEqual(['programme.create', 'programme.edit']);
  });

  it('refuses a change that breaks a budget, and leaves the programme as it was', async () => {
    const { programme } = (await (
      await create({ name: 'Tight', settings: settings({ budgetsGbp: [20_000, 20_000, 20_000] }) })
    ).json()) as {
      programme: View;
    };
    const stored = () =>
      db
        .selectFrom('programmes')
        .select(['placements', 'settings'])
        .where('id', '=', programme.id)
        .executeTakeFirstOrThrow();
    const outside = [...installed.keys()].filter((id) => !roomsOf(programme).some((r) => r.roomId === id));
    let status = 0;
    let message = '';
    let lastGood = await stored();
    // Pin rooms into the first year one by one until its £20,000 cannot take the next.
    for (const roomId of outside) {
      lastGood = await stored();
      const response = await api(`/api/programmes/${programme.id}/edits`, {
        method: 'POST',
        cookie: admin.cookie,
        body: JSON.stringify({ action: 'pin', roomId, year: 1, windowId: 'summer' }),
      });
      status = response.status;
      if (status !== 200) {
        message = ((await response.json()) as { error: { message: string } }).error.message;
        break;
      }
    }
    expect(status).toBe(409);
    expect(message).toMatch(/cannot be placed/);
    expect(await stored()).toEqual(lastGood);
  });

  it('lets viewers read and export but not change; other trusts see nothing', async () => {
    const list = (await (await api('/api/programmes', { cookie: viewer })).json()) as {
      programmes: { id: string; name: string }[];
    };
    const id = list.programmes.find((p) => p.name === 'Three years')!.id;
    expect((await api(`/api/programmes/${id}`, { cookie: viewer })).status).toBe(200);
    expect((await api(`/api/programmes/${id}/programme.xlsx`, { cookie: viewer })).status).toBe(200);
    const put = await api(`/api/programmes/${id}`, {
      method: 'PUT',
      cookie: viewer,
      body: JSON.stringify({ name: 'Mine' }),
    });
    expect(put.status).toBe(403);
    const other = await createOtherTrust();
    expect((await api(`/api/programmes/${id}`, { cookie: other.cookie })).status).toBe(404);
    expect((await api(`/api/programmes/${id}/report.pdf`, { cookie: other.cookie })).status).toBe(404);
  });

  it('shows a school-limited member only their school, and keeps their own programmes to it', async () => {
    const list = (await (await api('/api/programmes', { cookie: limited })).json()) as {
      programmes: { id: string; name: string; partial: boolean }[];
    };
    const shared = list.programmes.find((p) => p.name === 'Three years')!;
    expect(shared.partial).toBe(true);
    const { programme } = (await (await api(`/api/programmes/${shared.id}`, { cookie: limited })).json()) as {
      programme: View;
    };
    expect(roomsOf(programme).every((r) => r.schoolId === fixture.schoolIds[0])).toBe(true);
    expect(programme.canEdit).toBe(false);
    const put = await api(`/api/programmes/${shared.id}`, {
      method: 'PUT',
      cookie: limited,
      body: JSON.stringify({ name: 'Taken' }),
    });
    expect(put.status).toBe(403);
    const own = await create({ name: 'Our school', settings: settings() }, limited);
    expect(own.status, await own.clone().text()).toBe(201);
    const ownView = ((await own.json()) as { programme: View }).programme;
    expect(roomsOf(ownView).length).toBeGreaterThan(0);
    expect(roomsOf(ownView).every((r) => r.schoolId === fixture.schoolIds[0])).toBe(true);
    const bid = await api(`/api/programmes/${shared.id}/bid-pack.pdf?schoolId=${fixture.schoolIds[1]}`, {
      cookie: limited,
    });
    expect(bid.status).toBe(404);
  });

  it('exports a workbook with a summary, one sheet per year, the rooms left out, assumptions and cautions', async () => {
    const list = (await (await api('/api/programmes', { cookie: admin.cookie })).json()) as {
      programmes: { id: string; name: string }[];
    };
    const id = list.programmes.find((p) => p.name === 'Three years')!.id;
    const { programme } = (await (await api(`/api/programmes/${id}`, { cookie: admin.cookie })).json()) as {
      programme: View;
    };
    const response = await api(`/api/programmes/${id}/programme.xlsx`, { cookie: admin.cookie });
    expect(response.headers.get('content-type')).toContain('spreadsheetml');
    const book = new ExcelJS.Workbook();
    await book.xlsx.load(Buffer.from(await response.arrayBuffer()) as never);
    expect(book.worksheets.map((s) => s.name)).toEqual([
      'Summary',
      '2027-28',
      '2028-29',
      '2029-30',
      'Not in programme',
      'Assumptions',
      'Cautions',
    ]);
    // Each year sheet lists that year's rooms (room code in column C) and its visits.
    for (const [index, name] of ['2027-28', '2028-29', '2029-30'].entries()) {
      const sheet = book.getWorksheet(name)!;
      const codes: string[] = [];
      sheet.eachRow((row, n) => {
        const code = String(row.getCell(3).value ?? '');
        if (n > 1 && code) codes.push(code);
      });
      expect(codes).toHaveLength(roomsOf(programme).filter((r) => r.year === index + 1).length);
    }
    const cautions: string[] = [];
    book.getWorksheet('Cautions')!.eachRow((row) => cautions.push(String(row.getCell(1).value)));
    expect(cautions.join(' ')).toMatch(/competent, licensed engineer/);
    expect(cautions.join(' ')).toMatch(/not a design/);
  });

  it('makes a board report PDF with its pages, figures, programme table, assumptions and cautions', async () => {
    const list = (await (await api('/api/programmes', { cookie: admin.cookie })).json()) as {
      programmes: { id: string; name: string }[];
    };
    const id = list.programmes.find((p) => p.name === 'Three years')!.id;
    const response = await api(`/api/programmes/${id}/report.pdf`, { cookie: admin.cookie });
    expect(response.headers.get('content-type')).toBe('application/pdf');
    const pages = await pdfPages(await response.arrayBuffer());
    expect(pages.length).toBeGreaterThanOrEqual(3);
    const text = pages.join(' ');
    for (const part of [
      'Capital programme: Three years',
      'Headline',
      'Figure 1. Capital used, with on-costs, against the capital available',
      'Figure 2. Pupil-hours of poor air removed a year against capital spent',
      'The programme, year by year',
      '2027/28',
      'Programme API School 001',
      'Assumptions and their sources',
      'RICS NRM 1',
      'Cautions',
      'competent, licensed engineer',
    ])
      expect(text).toContain(part);
    for (const [i, page] of pages.entries()) expect(page).toContain(`page ${i + 1} of ${pages.length}`);
  });

  it('makes a funding-bid pack for one school with its rooms, evidence, costs and carbon', async () => {
    const list = (await (await api('/api/programmes', { cookie: admin.cookie })).json()) as {
      programmes: { id: string; name: string }[];
    };
    const id = list.programmes.find((p) => p.name === 'Three years')!.id;
    const { programme } = (await (await api(`/api/programmes/${id}`, { cookie: admin.cookie })).json()) as {
      programme: View;
    };
    const school = roomsOf(programme)[0]!;
    const response = await api(`/api/programmes/${id}/bid-pack.pdf?schoolId=${school.schoolId}`, {
      cookie: admin.cookie,
    });
    expect(response.status).toBe(200);
    const text = (await pdfPages(await response.arrayBuffer())).join(' ');
    expect(text).toContain(`Funding bid: ventilation with heat recovery at ${school.schoolName}`);
    for (const part of [
      'Predicted mean / peak CO2',
      'No monitor readings are held',
      'Capital per tonne CO2e',
      'Costs with on-costs',
      'Preliminaries',
      'competent, licensed engineer',
    ])
      expect(text).toContain(part);
    for (const r of roomsOf(programme).filter((x) => x.schoolId === school.schoolId))
      expect(text).toContain((r as unknown as { roomCode: string }).roomCode);
  });

  it("puts a room's measured CO2 in the bid pack: the stalest season with enough school days", async () => {
    const list = (await (await api('/api/programmes', { cookie: admin.cookie })).json()) as {
      programmes: { id: string; name: string }[];
    };
    const baseId = list.programmes.find((p) => p.name === 'Three years')!.id;
    const { programme: base } = (await (await api(`/api/programmes/${baseId}`, { cookie: admin.cookie })).json()) as {
      programme: View;
    };
    const line = roomsOf(base)[0]!;
    const schoolRooms = roomsOf(base).filter((r) => r.schoolId === line.schoolId);
    // Invented readings summary: winter 1,432 ppm over 21 days, mid-season 1,610 ppm over only 3 days
    // (too few to count), summer 905 ppm over 14 days. The pack should show 1,432.
    const season = (name: string, days: number, occupiedMeanPpm: number) => ({ season: name, days, occupiedMeanPpm });
    await db
      .insertInto('monitor_room_analyses')
      .values({
        room_id: line.roomId,
        trust_id: admin.trustId,
        school_id: line.schoolId,
        days: 38,
        first_date: '2026-01-05',
        last_date: '2026-07-10',
        result: JSON.stringify({
          seasons: {
            winter: season('winter', 21, 1432.4),
            mid: season('mid', 3, 1610),
            summer: season('summer', 14, 905),
          },
          days: 38,
          firstDate: '2026-01-05',
          lastDate: '2026-07-10',
        }),
        criterion_pack_id: 'test',
        assumptions_version: 'test',
      })
      .execute();
    try {
      const created = await create({ name: 'With measurements', settings: settings() });
      expect(created.status, await created.clone().text()).toBe(201);
      const { programme } = (await created.json()) as { programme: View };
      const response = await api(`/api/programmes/${programme.id}/bid-pack.pdf?schoolId=${line.schoolId}`, {
        cookie: admin.cookie,
      });
      expect(response.status).toBe(200);
      const text = (await pdfPages(await response.arrayBuffer())).join(' ');
      expect(text).toContain('1,432');
      expect(text).not.toContain('1,610');
      expect(text).toContain(`where they exist (1 of ${schoolRooms.length} rooms)`);
      expect(text).not.toContain('No monitor readings are held');
      const removed = await api(`/api/programmes/${programme.id}`, { method: 'DELETE', cookie: admin.cookie });
      expect(removed.status).toBeLessThan(300);
    } finally {
      await db.deleteFrom('monitor_room_analyses').where('room_id', '=', line.roomId).execute();
    }
  });

  it('compares two scenarios, re-plans from the latest results and deletes (all audited)', async () => {
    const list = (await (await api('/api/programmes', { cookie: admin.cookie })).json()) as {
      programmes: { id: string; name: string }[];
    };
    const base = list.programmes.find((p) => p.name === 'Three years')!.id;
    const scenario = await create({
      name: 'Bigger budget',
      basedOn: base,
      settings: settings({ budgetsGbp: [120_000, 120_000, 120_000] }),
    });
    expect(scenario.status).toBe(201);
    const bigger = ((await scenario.json()) as { programme: View }).programme;
    const compare = await api(`/api/programmes/compare?ids=${base},${bigger.id}`, { cookie: viewer });
    expect(compare.status).toBe(200);
    const body = (await compare.json()) as {
      programmes: { name: string; rooms: number }[];
      series: { points: unknown[] }[];
    };
    expect(body.programmes.map((p) => p.name)).toEqual(['Three years', 'Bigger budget']);
    expect(body.programmes[1]!.rooms).toBeGreaterThanOrEqual(body.programmes[0]!.rooms);
    expect(body.series.every((s) => s.points.length > 1)).toBe(true);
    expect(
      (await api(`/api/programmes/${bigger.id}/refresh`, { method: 'POST', cookie: admin.cookie, body: '{}' })).status,
    ).toBe(200);
    expect((await api(`/api/programmes/${bigger.id}`, { method: 'DELETE', cookie: admin.cookie })).status).toBe(204);
    expect((await api(`/api/programmes/${bigger.id}`, { cookie: admin.cookie })).status).toBe(404);
    const audit = await db.selectFrom('audit_events').select('action').where('entity_id', '=', bigger.id).execute();
    expect(audit.map((a) => a.action).sort()).toEqual(['programme.create', 'programme.delete', 'programme.refresh']);
  });
});
