import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import ExcelJS from 'exceljs';
import { sql } from 'kysely';
import { DEMO_TRUST } from '../../scripts/seed/demo-trust';
import { createDb } from '../../src/lib/server/db/client';
import { refreshRanks } from '../../src/lib/server/portfolio/ranking.repository';
import { assess } from '../helpers/assessments';
import { DEMO_ACCOUNTS, api, signIn } from '../helpers/session';

const db = createDb(process.env.DATABASE_URL!);

// The required header, typed out from the export's specification (not imported from the code under test).
const REQUIRED_HEADER = [
  'Rank',
  'School',
  'Block',
  'Room code',
  'Risk band',
  'Daily mean CO2 (ppm)',
  'Peak CO2 (ppm)',
  'Units recommended',
  'Capital cost (GBP)',
  'Annual saving (GBP)',
  'Simple payback (years)',
  'NPV (GBP)',
];

/**
 * Runs the whole trust and waits for it to succeed (throws when it fails or takes over 60 s). The worker that finished
 * the run ranks the trust next; wait for that ranking (or make it) so the export reads the new run's ranks, not the
 * previous run's that a reader gets while the ranking is being rebuilt.
 */
async function runTrust(cookie: string): Promise<void> {
  await assess(cookie, { scope: 'trust' }, 60_000);
  await refreshRanks(db, DEMO_TRUST.id);
}

async function download(cookie: string): Promise<ExcelJS.Workbook> {
  const response = await api('/api/exports/results.xlsx', { cookie });
  expect(response.status).toBe(200);
  expect(response.headers.get('content-type')).toContain('spreadsheetml');
  const book = new ExcelJS.Workbook();
  await book.xlsx.load(Buffer.from(await response.arrayBuffer()) as never);
  return book;
}

const rowValues = (row: ExcelJS.Row) => (row.values as unknown[]).slice(1);

describe('results export (.xlsx)', () => {
  let estates: string;
  let roomId: string;
  let originalCode: string;
  beforeAll(async () => {
    estates = await signIn(DEMO_ACCOUNTS.estates_manager);
    // A room code that a spreadsheet would run as a formula if written as-is.
    const room = await db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .select(['rooms.id', 'rooms.code'])
      .where('schools.trust_id', '=', DEMO_TRUST.id)
      .orderBy('rooms.code')
      .limit(1)
      .executeTakeFirstOrThrow();
    roomId = room.id;
    originalCode = room.code;
    await db
      .updateTable('rooms')
      .set({ code: '=HYPERLINK("http://example.invalid","x")' })
      .where('id', '=', roomId)
      .execute();
    await runTrust(estates);
  });
  afterAll(async () => {
    await db.updateTable('rooms').set({ code: originalCode }).where('id', '=', roomId).execute();
    await db.destroy();
  });

  it('has a Results sheet whose header starts with exactly the required columns, one row per current result by rank', async () => {
    const book = await download(await signIn(DEMO_ACCOUNTS.viewer));
    const results = book.getWorksheet('Results')!;
    expect(rowValues(results.getRow(1)).slice(0, REQUIRED_HEADER.length)).toEqual(REQUIRED_HEADER);
    const current = await db
      .selectFrom('current_room_results')
      .select(sql<number>`count(*)::int`.as('n'))
      .where('trust_id', '=', DEMO_TRUST.id)
      .executeTakeFirstOrThrow();
    expect(results.actualRowCount - 1).toBe(current.n);
    const ranks = Array.from({ length: current.n }, (_, i) => results.getRow(i + 2).getCell(1).value);
    expect(ranks).toEqual(Array.from({ length: current.n }, (_, i) => i + 1));
    // Rank 1 matches the database's rank-1 row.
    const top = await db
      .selectFrom('current_portfolio_ranks')
      .innerJoin('room_results', (j) =>
        j
          .onRef('room_results.room_id', '=', 'current_portfolio_ranks.room_id')
          .onRef('room_results.run_id', '=', 'current_portfolio_ranks.run_id'),
      )
      .innerJoin('rooms', 'rooms.id', 'room_results.room_id')
      .select(['rooms.code', 'room_results.mean_co2_ppm'])
      .where('current_portfolio_ranks.trust_id', '=', DEMO_TRUST.id)
      .where('current_portfolio_ranks.rank', '=', 1)
      .executeTakeFirstOrThrow();
    const first = results.getRow(2);
    expect(String(first.getCell(4).value).replace(/^'/, '')).toBe(top.code);
    expect(first.getCell(6).value).toBe(Math.round(top.mean_co2_ppm));
  });

  it('gives a finance lead columns to sum: a count of units, the models apart, £ formats and the baseline named', async () => {
    const book = await download(estates);
    const results = book.getWorksheet('Results')!;
    const header = rowValues(results.getRow(1)) as string[];
    const col = (name: string) => header.indexOf(name) + 1;
    expect(col('Unit models')).toBeGreaterThan(0);
    expect(col('Baseline of the money columns')).toBeGreaterThan(0);
    let withUnits = 0;
    results.eachRow((row, n) => {
      if (n === 1) return;
      const units = row.getCell(col('Units recommended')).value;
      expect(typeof units).toBe('number');
      if ((units as number) > 0) {
        withUnits += 1;
        expect(String(row.getCell(col('Unit models')).value)).toMatch(/^\d+ × /);
        expect(String(row.getCell(col('Baseline of the money columns')).value)).toMatch(
          /heat recovery|today|compliant/,
        );
        expect(row.getCell(col('Capital cost (GBP)')).numFmt).toMatch(/£/);
        expect(row.getCell(col('NPV (GBP)')).numFmt).toMatch(/£/);
      }
    });
    expect(withUnits).toBeGreaterThan(0);
  });

  it('writes formula-like text as text with a leading apostrophe', async () => {
    const book = await download(estates);
    const results = book.getWorksheet('Results')!;
    let found = false;
    results.eachRow((row) => {
      const cell = row.getCell(4);
      if (typeof cell.value === 'string' && cell.value.includes('HYPERLINK')) {
        found = true;
        expect(cell.value).toBe(`'=HYPERLINK("http://example.invalid","x")`);
        expect(cell.formula).toBeUndefined();
      }
    });
    expect(found).toBe(true);
  });

  it('has a Notes sheet with the cautions and the assumptions used, each with its source and status', async () => {
    const book = await download(estates);
    const notes = book.getWorksheet('Notes')!;
    const lines: unknown[][] = [];
    notes.eachRow((row) => lines.push(rowValues(row)));
    const text = lines.map((l) => l.join(' | ')).join('\n');
    expect(text).toMatch(/Screening estimates for prioritising, not a design/);
    expect(text).toMatch(/competent, licensed engineer/);
    expect(text).toMatch(/Assumptions used: /);
    const outdoor = lines.find((l) => l[0] === 'Outdoor CO2');
    // NOAA GML Mauna Loa 2024 annual mean ≈ 424.6 ppm, rounded (from memory).
    expect(outdoor?.[1]).toBe(425);
    expect(outdoor?.[2]).toBe('ppm');
    expect(String(outdoor?.[3])).toMatch(/NOAA|Mauna Loa/);
    expect(outdoor?.[4]).toBe('from memory');
    const criteria = lines.find((l) => l[0] === 'CO2 criteria packs');
    expect(criteria?.[6]).toBe('Yes');
  });

  it('returns 401 without a session', async () => {
    expect((await api('/api/exports/results.xlsx')).status).toBe(401);
  });
});
