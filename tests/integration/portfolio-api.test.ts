import ExcelJS from 'exceljs';
import { sql, type Kysely } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Database } from '../../db/database';
import { testDb } from '../helpers/db';
import { DEMO_ACCOUNTS, api, createOtherTrust, signIn } from '../helpers/session';
import { insertAssessedRooms, type Fixture } from './portfolio-fixture';

// A fresh trust (signed up through the app, so its admin can sign in) with 3 schools × 1,000 invented
// assessed rooms. Expected orders and sums are worked out here from the raw inserted rows.

interface Raw {
  room_id: string;
  school_id: string;
  block_id: string | null;
  risk_band: number;
  criteria_met: boolean;
  ventilation_type: string;
  pupil_hours_above: number;
  risk_score: number;
  pupil_hours_removed_per_1000_gbp: number | null;
  simple_payback_years: number | null;
  capital_cost_gbp: number | null;
  pupils: number;
}
interface Row {
  roomId: string;
  rank: number;
  schoolId: string;
  riskBand: number;
  criteriaMet: boolean;
  ventilationType: string;
  simplePaybackYears: number | null;
  roomName: string;
}
interface Page {
  rows: Row[];
  total: number;
  page: number;
  pageSize: number;
  preview: boolean;
}

/**
 * The ranking rule, restated here from the stored parts (independently of the app's ranking module): each part
 * divided by the best room's (risk score ÷ highest; pupil-hours removed per £1,000 ÷ highest; shortest payback ÷
 * own payback, 1 for a payback of 0, 0 without one), the weighted sum over the sum of the weights, highest first;
 * ties to more pupil-hours above the threshold, then to the smaller room id.
 */
function expectedOrder(rows: Raw[], w: { risk: number; cost: number; payback: number }): string[] {
  const sum = w.risk + w.cost + w.payback;
  const maxRisk = Math.max(0, ...rows.map((r) => r.risk_score));
  const ces = rows.map((r) => r.pupil_hours_removed_per_1000_gbp).filter((x): x is number => x !== null);
  const maxCe = Math.max(0, ...ces);
  const paybacks = rows.map((r) => r.simple_payback_years).filter((x): x is number => x !== null);
  const minPb = paybacks.length ? Math.min(...paybacks) : Number.POSITIVE_INFINITY;
  const parts = (r: Raw) => {
    const risk = maxRisk > 0 ? r.risk_score / maxRisk : 0;
    const ce =
      maxCe > 0 && r.pupil_hours_removed_per_1000_gbp !== null ? r.pupil_hours_removed_per_1000_gbp / maxCe : 0;
    const pb =
      r.simple_payback_years === null
        ? 0
        : r.simple_payback_years <= 0
          ? 1
          : Math.min(1, minPb / r.simple_payback_years);
    return { risk, ce, pb };
  };
  const score = (r: Raw) => {
    const p = parts(r);
    return (w.risk * p.risk + w.cost * p.ce + w.payback * p.pb) / sum;
  };
  return [...rows]
    .sort(
      (a, b) => score(b) - score(a) || b.pupil_hours_above - a.pupil_hours_above || (a.room_id < b.room_id ? -1 : 1),
    )
    .map((r) => r.room_id);
}

describe('portfolio API', () => {
  let db: Kysely<Database>;
  let admin: { cookie: string; trustId: string };
  let fixture: Fixture;
  let raw: Raw[];

  const getJson = async <T>(path: string, cookie = admin.cookie) => {
    const response = await api(path, { cookie });
    expect(
      response.status,
      `${path} → ${response.status} ${response.status !== 200 ? await response.clone().text() : ''}`,
    ).toBe(200);
    return (await response.json()) as T;
  };
  const putWeights = (weights: { risk: number; costEffectiveness: number; payback: number }) =>
    api('/api/priorities/weights', { method: 'PUT', cookie: admin.cookie, body: JSON.stringify(weights) });
  const allPages = async (query: string, pageSize = 200) => {
    const rows: Row[] = [];
    for (let page = 1; ; page += 1) {
      const body = await getJson<Page>(`/api/priorities?${query}&page=${page}&pageSize=${pageSize}`);
      rows.push(...body.rows);
      if (body.rows.length < pageSize) return { rows, total: body.total };
    }
  };

  beforeAll(async () => {
    db = testDb();
    admin = await createOtherTrust();
    fixture = await insertAssessedRooms(db, {
      trustId: admin.trustId,
      createTrust: false,
      schools: 3,
      roomsPerSchool: 1000,
      label: 'Portfolio API',
    });
    // One room name a spreadsheet would run as a formula, to check the export's guard.
    await db
      .updateTable('rooms')
      .set({ name: '=HYPERLINK("http://example.invalid","x")' })
      .where('school_id', '=', fixture.schoolIds[0]!)
      .where('code', '=', 'R00001')
      .execute();
    // Ties: ten rooms with the same parts and pupil-hours (broken by room id), five more with the same parts but
    // fewer pupil-hours (broken by pupil-hours).
    const tied = await sql<{
      room_id: string;
    }>`SELECT room_id FROM current_room_results WHERE trust_id = ${admin.trustId}
      ORDER BY room_id DESC LIMIT 15`.execute(db);
    const ids = tied.rows.map((r) => r.room_id);
    await sql`UPDATE room_results SET risk_score = 0.61, pupil_hours_removed_per_1000_gbp = 300, simple_payback_years = 40,
      pupil_hours_above = CASE WHEN room_id = ANY(${ids.slice(0, 10)}::uuid[]) THEN 2222 ELSE 1111 END
      WHERE run_id IN (SELECT run_id FROM assessment_current WHERE trust_id = ${admin.trustId})
        AND room_id = ANY(${ids}::uuid[])`.execute(db);
    raw = (
      await sql<Raw>`SELECT room_id, school_id, block_id, risk_band, criteria_met, ventilation_type, pupil_hours_above, risk_score,
        pupil_hours_removed_per_1000_gbp, simple_payback_years, capital_cost_gbp, pupils
        FROM current_room_results WHERE trust_id = ${admin.trustId}`.execute(db)
    ).rows;
    expect(raw).toHaveLength(3000);
  });
  afterAll(async () => {
    await db.deleteFrom('portfolio_settings').where('trust_id', '=', 'demo-trust').execute();
    await db.destroy();
  });

  it('ranks every room in the order of the default weights, without gaps, across pages', async () => {
    const { rows, total } = await allPages('sort=rank');
    expect(total).toBe(3000);
    expect(rows.map((r) => r.roomId)).toEqual(expectedOrder(raw, { risk: 0.6, cost: 0.3, payback: 0.1 }));
    expect(rows.map((r) => r.rank)).toEqual(Array.from({ length: 3000 }, (_, i) => i + 1));
  });

  it('returns the same rooms for page 3 of 50 as positions 101–150 of the whole list', async () => {
    const page3 = await getJson<Page>('/api/priorities?sort=rank&page=3&pageSize=50');
    expect(page3.rows.map((r) => r.rank)).toEqual(Array.from({ length: 50 }, (_, i) => 101 + i));
    expect(page3.rows.map((r) => r.roomId)).toEqual(
      expectedOrder(raw, { risk: 0.6, cost: 0.3, payback: 0.1 }).slice(100, 150),
    );
  });

  it('previews other weights from the query string without saving them', async () => {
    const { rows } = await allPages('sort=rank&wRisk=0&wCost=0.2&wPayback=0.8');
    expect(rows.map((r) => r.roomId)).toEqual(expectedOrder(raw, { risk: 0, cost: 0.2, payback: 0.8 }));
    const saved = await getJson<{ isDefault: boolean }>('/api/priorities/weights');
    expect(saved.isDefault).toBe(true);
  });

  it('sorts by payback, shortest first, with rooms that never pay back last', async () => {
    const { rows } = await allPages('sort=simplePaybackYears&dir=asc');
    const paybacks = rows.map((r) => r.simplePaybackYears);
    const firstNull = paybacks.indexOf(null);
    const expectedNulls = raw.filter((r) => r.simple_payback_years === null).length;
    expect(expectedNulls).toBeGreaterThan(0);
    expect(paybacks.slice(firstNull).every((p) => p === null)).toBe(true);
    expect(paybacks.length - firstNull).toBe(expectedNulls);
    const numbers = paybacks.slice(0, firstNull) as number[];
    expect(numbers.every((p, i) => i === 0 || p >= numbers[i - 1]!)).toBe(true);
  });

  it('filters by school, band, ventilation type and criterion met, counting only what matches', async () => {
    const school = fixture.schoolIds[1]!;
    const bySchool = await allPages(`sort=rank&schoolId=${school}`);
    expect(bySchool.total).toBe(raw.filter((r) => r.school_id === school).length);
    expect(bySchool.rows.every((r) => r.schoolId === school)).toBe(true);
    const ranks = bySchool.rows.map((r) => r.rank);
    expect(ranks.every((r, i) => i === 0 || r > ranks[i - 1]!)).toBe(true);

    const combined = await allPages(`sort=rank&band=4&ventilationType=natural_cross&criteriaMet=false`);
    const expected = raw.filter((r) => r.risk_band === 4 && r.ventilation_type === 'natural_cross' && !r.criteria_met);
    expect(combined.total).toBe(expected.length);
    expect(new Set(combined.rows.map((r) => r.roomId))).toEqual(new Set(expected.map((r) => r.room_id)));
  });

  it('refuses bad query strings with a message naming the parameter', async () => {
    for (const [query, word] of [
      ['sort=colour', 'sort'],
      ['pageSize=500', 'pageSize'],
      ['wRisk=0.5', 'wRisk'],
      ['band=7', 'band'],
      ['schoolId=abc', 'schoolId'],
    ] as const) {
      const response = await api(`/api/priorities?${query}`, { cookie: admin.cookie });
      expect(response.status, query).toBe(400);
      const body = (await response.json()) as { error: { code: string; message: string } };
      expect(body.error.message).toContain(word);
    }
  });

  it('saves weights for the trust, audits the change and re-ranks with them', async () => {
    expect((await putWeights({ risk: 0.1, costEffectiveness: 0.1, payback: 0.8 })).status).toBe(200);
    const { rows } = await allPages('sort=rank');
    expect(rows.map((r) => r.roomId)).toEqual(expectedOrder(raw, { risk: 0.1, cost: 0.1, payback: 0.8 }));
    const audit = await db
      .selectFrom('audit_events')
      .selectAll()
      .where('trust_id', '=', admin.trustId)
      .where('action', '=', 'portfolio.weights.save')
      .execute();
    expect(audit).toHaveLength(1);
    expect(audit[0]!.after).toEqual({ risk: 0.1, costEffectiveness: 0.1, payback: 0.8 });
  });

  it('shows the same rank on the priorities list, the room page, results.xlsx and priorities.xlsx (saved weights, ties included)', async () => {
    const expected = expectedOrder(raw, { risk: 0.1, cost: 0.1, payback: 0.8 });
    const rankOf = new Map(expected.map((id, i) => [id, i + 1]));
    // The tied rooms sit together, ordered by pupil-hours then room id.
    const tiedRanks = raw
      .filter((r) => r.risk_score === 0.61 && r.simple_payback_years === 40)
      .sort((a, b) => b.pupil_hours_above - a.pupil_hours_above || (a.room_id < b.room_id ? -1 : 1))
      .map((r) => rankOf.get(r.room_id)!);
    expect(tiedRanks).toEqual(Array.from({ length: 15 }, (_, i) => tiedRanks[0]! + i));

    const codes = new Map(
      (
        await db
          .selectFrom('rooms')
          .select(['id', 'code', 'school_id'])
          .where('school_id', 'in', fixture.schoolIds)
          .execute()
      ).map((r) => [r.id, r]),
    );
    // results.xlsx: every room, in rank order, with the rank in column A.
    const response = await api('/api/exports/results.xlsx', { cookie: admin.cookie });
    expect(response.status).toBe(200);
    const book = new ExcelJS.Workbook();
    await book.xlsx.load(Buffer.from(await response.arrayBuffer()) as unknown as ArrayBuffer);
    const sheet = book.getWorksheet('Results')!;
    for (const rank of [1, 2, 3, tiedRanks[0]!, tiedRanks[14]!, 3000]) {
      const row = sheet.getRow(rank + 1);
      expect(row.getCell(1).value).toBe(rank);
      expect(String(row.getCell(4).value).replace(/^'/, '')).toBe(codes.get(expected[rank - 1]!)!.code);
    }
    // The room page of a tied room says the same place.
    const roomId = expected[tiedRanks[3]! - 1]!;
    const page = await api(`/app/rooms/${roomId}`, { cookie: admin.cookie });
    expect(page.status).toBe(200);
    expect(await page.text()).toContain(`rank ${tiedRanks[3]!.toLocaleString('en-GB')} of 3,000`);
    // priorities.xlsx of the whole trust: rank column in the same order.
    const pri = await api('/api/exports/priorities.xlsx?sort=rank', { cookie: admin.cookie });
    const priBook = new ExcelJS.Workbook();
    await priBook.xlsx.load(Buffer.from(await pri.arrayBuffer()) as unknown as ArrayBuffer);
    const priSheet = priBook.getWorksheet('Priorities')!;
    expect(priSheet.getRow(2).getCell(1).value).toBe(1);
    expect(String(priSheet.getRow(tiedRanks[0]! + 1).getCell(4).value).replace(/^'/, '')).toBe(
      codes.get(expected[tiedRanks[0]! - 1]!)!.code,
    );
  });

  it('refuses weights that are all zero or out of range', async () => {
    for (const body of [
      { risk: 0, costEffectiveness: 0, payback: 0 },
      { risk: 2, costEffectiveness: 0, payback: 0 },
      { risk: 0.5 },
    ]) {
      const response = await api('/api/priorities/weights', {
        method: 'PUT',
        cookie: admin.cookie,
        body: JSON.stringify(body),
      });
      expect(response.status).toBe(400);
    }
  });

  it('lets estates managers save weights and refuses viewers and finance leads', async () => {
    const body = JSON.stringify({ risk: 0.5, costEffectiveness: 0.3, payback: 0.2 });
    expect(
      (await api('/api/priorities/weights', { method: 'PUT', cookie: await signIn(DEMO_ACCOUNTS.viewer), body }))
        .status,
    ).toBe(403);
    expect(
      (await api('/api/priorities/weights', { method: 'PUT', cookie: await signIn(DEMO_ACCOUNTS.finance_lead), body }))
        .status,
    ).toBe(403);
    expect(
      (
        await api('/api/priorities/weights', {
          method: 'PUT',
          cookie: await signIn(DEMO_ACCOUNTS.estates_manager),
          body,
        })
      ).status,
    ).toBe(200);
  });

  it('answers 401 without a session', async () => {
    for (const path of ['/api/priorities', '/api/finance', '/api/dashboard', '/api/exports/priorities.xlsx']) {
      expect((await api(path)).status, path).toBe(401);
    }
  });

  it("never shows another trust's rooms, even when asked for its school", async () => {
    const demo = await signIn(DEMO_ACCOUNTS.viewer);
    const page = await getJson<Page>(`/api/priorities?schoolId=${fixture.schoolIds[0]}`, demo);
    expect(page.total).toBe(0);
    expect(page.rows).toEqual([]);
    const finance = await getJson<{ schools: { schoolId: string }[] }>(
      `/api/finance?schoolId=${fixture.schoolIds[0]}`,
      demo,
    );
    expect(finance.schools).toEqual([]);
  });

  it('exports the current view with a Cautions sheet and formula-like text kept as text', async () => {
    const school = fixture.schoolIds[0]!;
    const response = await api(`/api/exports/priorities.xlsx?sort=rank&schoolId=${school}`, { cookie: admin.cookie });
    expect(response.status).toBe(200);
    expect(response.headers.get('content-type')).toContain('spreadsheetml');
    const book = new ExcelJS.Workbook();
    await book.xlsx.load(Buffer.from(await response.arrayBuffer()) as unknown as ExcelJS.Buffer);
    const sheet = book.getWorksheet('Priorities')!;
    const header = (sheet.getRow(1).values as unknown[]).slice(1);
    expect(header.slice(0, 4)).toEqual(['Rank', 'School', 'Block', 'Room code']);
    expect(sheet.rowCount - 1).toBe(raw.filter((r) => r.school_id === school).length);
    const names = [] as unknown[];
    sheet.eachRow((row, n) => n > 1 && names.push(row.getCell(5).value));
    expect(names).toContain('\'=HYPERLINK("http://example.invalid","x")');
    expect(names.some((v) => typeof v === 'object' && v !== null)).toBe(false);
    const cautions = book.getWorksheet('Cautions')!;
    const text = (cautions.getColumn(1).values as unknown[]).join(' ');
    expect(text).toContain('not a design');
    expect(text).toContain('competent, licensed engineer');
  });

  it('lists one finance row per installed unit, with school subtotals and trust totals that add up', async () => {
    const report = await getJson<{
      schools: {
        schoolId: string;
        units: { capitalCostGbp: number; npvGbp: number; heatingRenewal: unknown; blockName: string }[];
        subtotal: { units: number; capitalCostGbp: number; npvGbp: number };
      }[];
      totals: { units: number; capitalCostGbp: number; annualSavingGbp: number };
      sensitivity: {
        byEnergyPrice: { energyPriceChangePct: number; annualSavingGbp: number; npvGbp: number }[];
        byDiscountRate: { discountRate: number }[];
      };
      baseline: { words: string; discountRate: number; appraisalYears: number };
    }>('/api/finance');
    const units = await sql<{
      n: number;
      capital: number;
    }>`SELECT sum(unit_count)::int AS n, sum(capital_cost_gbp)::float8 AS capital
      FROM current_room_results WHERE trust_id = ${admin.trustId} AND unit_count > 0`.execute(db);
    expect(report.totals.units).toBe(units.rows[0]!.n);
    expect(report.totals.capitalCostGbp).toBeCloseTo(units.rows[0]!.capital, 2);
    for (const school of report.schools) {
      expect(school.units).toHaveLength(school.subtotal.units);
      expect(school.subtotal.capitalCostGbp).toBeCloseTo(
        school.units.reduce((s, u) => s + u.capitalCostGbp, 0),
        4,
      );
      // The fixture's old blocks run gas plant installed in 2003: past 20 years, so flagged; heat-pump blocks never.
      for (const unit of school.units) expect(unit.heatingRenewal !== null).toBe(unit.blockName === 'Old Block');
    }
    expect(report.baseline.words).toContain('the same air without heat recovery');
    // Sensitivity: energy prices +30 % raise the energy part (saving + £60 maintenance per unit) by 30 %.
    const up = report.sensitivity.byEnergyPrice.find((c) => c.energyPriceChangePct === 30)!;
    const maintenance = 60 * report.totals.units;
    expect(up.annualSavingGbp).toBeCloseTo(1.3 * (report.totals.annualSavingGbp + maintenance) - maintenance, 2);
    const npvs = report.sensitivity.byEnergyPrice.map((c) => c.npvGbp);
    expect(npvs.every((v, i) => i === 0 || v > npvs[i - 1]!)).toBe(true);
    // Green Book NPV restated: −C + S·(1 − 1.035^−15)/0.035 at today's prices.
    const base = report.sensitivity.byEnergyPrice.find((c) => c.energyPriceChangePct === 0)!;
    const af = (1 - 1.035 ** -15) / 0.035;
    expect(report.baseline.discountRate).toBe(0.035);
    expect(base.npvGbp).toBeCloseTo(-report.totals.capitalCostGbp + report.totals.annualSavingGbp * af, 2);
  });

  it('gives dashboard headline figures that match the stored results', async () => {
    const d = await getJson<{
      headline: {
        roomsAssessed: number;
        roomsFailing: number;
        pupilsInFailingRooms: number;
        capitalAllUnitsGbp: number;
      };
      co2BySchool: { below1000: number; from1000to1500: number; from1500to2000: number; above2000: number }[];
      cumulative: { points: { rank: number; cumulativeCapitalGbp: number }[] };
    }>('/api/dashboard');
    expect(d.headline.roomsAssessed).toBe(3000);
    expect(d.headline.roomsFailing).toBe(raw.filter((r) => !r.criteria_met).length);
    expect(d.headline.pupilsInFailingRooms).toBe(raw.filter((r) => !r.criteria_met).reduce((s, r) => s + r.pupils, 0));
    const capital = raw.reduce((s, r) => s + (r.capital_cost_gbp ?? 0), 0);
    expect(d.headline.capitalAllUnitsGbp).toBeCloseTo(capital, 2);
    expect(d.co2BySchool.reduce((s, c) => s + c.below1000 + c.from1000to1500 + c.from1500to2000 + c.above2000, 0)).toBe(
      3000,
    );
    const last = d.cumulative.points[d.cumulative.points.length - 1]!;
    expect(last.cumulativeCapitalGbp).toBeCloseTo(capital, 2);
    expect(d.cumulative.points.length).toBeLessThanOrEqual(201);
  });

  // Runs last: it removes a room from the 3,000 the tests above count.
  it('counts the ranked rooms on the room page after a room is deleted, the last room ranked last of them', async () => {
    expect((await putWeights({ risk: 0.1, costEffectiveness: 0.1, payback: 0.8 })).status).toBe(200);
    const weights = { risk: 0.1, cost: 0.1, payback: 0.8 };
    const gone = expectedOrder(raw, weights)[0]!;
    const removed = await api(`/api/rooms/${gone}`, { method: 'DELETE', cookie: admin.cookie });
    expect(removed.status, await removed.clone().text()).toBe(204);
    const left = expectedOrder(
      raw.filter((r) => r.room_id !== gone),
      weights,
    );
    expect(left).toHaveLength(2999);
    for (const place of [1, 1500, 2999]) {
      const page = await api(`/app/rooms/${left[place - 1]}`, { cookie: admin.cookie });
      expect(page.status).toBe(200);
      expect(await page.text()).toContain(`rank ${place.toLocaleString('en-GB')} of 2,999`);
    }
  });
});
