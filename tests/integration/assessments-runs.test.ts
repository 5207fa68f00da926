import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import pg from 'pg';
import { JOBS_CHANNEL } from '../../src/lib/server/assessments/queue';
import { DEMO_SCHOOLS, DEMO_TRUST, demoRooms } from '../../scripts/seed/demo-trust';
import { createDb } from '../../src/lib/server/db/client';
import { runEnded, startRun } from '../helpers/assessments';
import { DEMO_ACCOUNTS, api, createOtherTrust, signIn } from '../helpers/session';

// Room counts come from the demo scenario definition, not from the API under test.
const demoRoomCount = DEMO_SCHOOLS.reduce((sum, school, index) => sum + demoRooms(school, index).length, 0);
const db = createDb(process.env.DATABASE_URL!);

interface RunStatus {
  status: 'queued' | 'running' | 'succeeded' | 'failed';
  roomsDone: number;
  roomsTotal: number;
  startedAt: string | null;
  finishedAt: string | null;
  error?: string;
  problems: { roomCode: string; field: string; message: string }[];
}

/** The run once it has ended (throws after 45 s), with the fields these tests read. */
const waitForRun = async (cookie: string, id: string) => (await runEnded(cookie, id, 45_000)) as unknown as RunStatus;

const currentRows = () =>
  db
    .selectFrom('current_room_results')
    .select(['run_id', 'room_id', 'school_id', 'risk_band', 'baseline', 'heating_fuel', 'fuel_price_gbp_per_kwh'])
    .where('trust_id', '=', DEMO_TRUST.id)
    .execute();

/** The trust's ranks as every page reads them (current_portfolio_ranks: the generation readers use, rebuilt on the first read after a run). */
async function ranksNow(cookie: string) {
  const response = await api('/api/priorities?pageSize=1', { cookie });
  expect(response.status).toBe(200);
  return db
    .selectFrom('current_portfolio_ranks')
    .select(['room_id', 'rank', 'score_risk'])
    .where('trust_id', '=', DEMO_TRUST.id)
    .execute();
}

describe('assessment runs API', () => {
  let estates: string;
  beforeAll(async () => {
    estates = await signIn(DEMO_ACCOUNTS.estates_manager);
  });
  afterAll(async () => {
    await db.destroy();
  });

  it('runs the whole demo estate: 202, progress to succeeded, one current result per room', async () => {
    const id = await startRun(estates, { scope: 'trust' });
    const done = await waitForRun(estates, id);
    expect(done.status, done.error).toBe('succeeded');
    expect(done.roomsTotal).toBe(demoRoomCount);
    expect(done.roomsDone).toBe(demoRoomCount);
    expect(done.startedAt).not.toBeNull();
    expect(new Date(done.finishedAt!).getTime()).toBeGreaterThanOrEqual(new Date(done.startedAt!).getTime());

    const written = await db
      .selectFrom('room_results')
      .select(sql<number>`count(*)::int`.as('n'))
      .where('run_id', '=', id)
      .executeTakeFirstOrThrow();
    expect(written.n + done.problems.length).toBe(demoRoomCount);
    const current = await currentRows();
    expect(current.length).toBe(written.n);
    expect(new Set(current.map((r) => r.run_id))).toEqual(new Set([id]));
    // Ranks are 1..n without gaps or repeats; bands 1–4; component scores 0–1.
    const ranks = await ranksNow(estates);
    expect(ranks.map((r) => r.rank).sort((a, b) => a - b)).toEqual(
      Array.from({ length: current.length }, (_, i) => i + 1),
    );
    for (const row of current) {
      expect(row.risk_band).toBeGreaterThanOrEqual(1);
      expect(row.risk_band).toBeLessThanOrEqual(4);
      // Every result records the fuel and price its figures used.
      expect(row.heating_fuel).not.toBeNull();
      expect(row.fuel_price_gbp_per_kwh).toBeGreaterThan(0);
    }
    for (const r of ranks) {
      expect(r.score_risk).toBeGreaterThanOrEqual(0);
      expect(r.score_risk).toBeLessThanOrEqual(1);
    }
  });

  it('fills every denormalised column a portfolio view reads, and keeps numbers and codes only', async () => {
    const row = await db
      .selectFrom('current_room_results')
      .innerJoin('rooms', 'rooms.id', 'current_room_results.room_id')
      .select([
        'current_room_results.pupils',
        'rooms.pupils as room_pupils',
        'current_room_results.ventilation_type',
        'rooms.ventilation_type as room_vent',
        'current_room_results.units_recommended',
        'current_room_results.unit_count',
        'current_room_results.unit_lines',
        'current_room_results.installed_cost_gbp',
        'current_room_results.life_years',
        'current_room_results.reason',
      ])
      .where('current_room_results.trust_id', '=', DEMO_TRUST.id)
      .where('current_room_results.unit_count', '>', 0)
      .limit(1)
      .executeTakeFirstOrThrow();
    expect(row.pupils).toBe(row.room_pupils);
    expect(row.ventilation_type).toBe(row.room_vent);
    expect(row.units_recommended).toMatch(/^\d+ × .+/);
    expect(row.reason.length).toBeGreaterThan(10);
    // The unit lines add up to the unit count and name the models the units column names.
    const lines = JSON.parse(row.unit_lines!) as [number, string][];
    expect(lines.reduce((n, [count]) => n + count, 0)).toBe(row.unit_count);
    for (const [count, model] of lines) expect(row.units_recommended).toContain(`${count} × ${model}`);
    expect(row.installed_cost_gbp).toBeGreaterThan(0);
    expect(row.life_years).toBeGreaterThan(0);
    // A result row stays compact: a few hundred bytes, not a detail document.
    const { rows } = await sql<{ bytes: number }>`
      SELECT max(pg_column_size(rr.*))::int AS bytes FROM current_room_results rr WHERE rr.trust_id = ${DEMO_TRUST.id}`.execute(
      db,
    );
    expect(rows[0]!.bytes).toBeLessThan(1000);
  });

  it('recomputes a room as the run saw it: the inputs it kept, the figures it stored, whatever the register says now', async () => {
    const stored = await db
      .selectFrom('current_room_results')
      .selectAll()
      .where('trust_id', '=', DEMO_TRUST.id)
      .where('unit_count', '>', 0)
      .orderBy('room_id')
      .limit(1)
      .executeTakeFirstOrThrow();
    const before = await db.selectFrom('rooms').selectAll().where('id', '=', stored.room_id).executeTakeFirstOrThrow();
    // The register changes after the run.
    await db
      .updateTable('rooms')
      .set({ pupils: (before.pupils ?? 20) + 3, openable_area_m2: null })
      .where('id', '=', stored.room_id)
      .execute();
    try {
      const response = await api(`/api/assessments/${stored.run_id}/rooms/${stored.room_id}`, { cookie: estates });
      expect(response.status).toBe(200);
      const detail = (await response.json()) as {
        input: { room: { pupils: number | null; openableAreaM2: number | null; floorAreaM2: number; code: string } };
        assessment: { risk: { reason: string }; pupils: number; seasons: Record<string, { curve: unknown[] }> };
        row: Record<string, unknown>;
      };
      // The inputs are the register's values when the run read them, not now.
      expect(detail.input.room).toMatchObject({
        code: before.code,
        pupils: before.pupils,
        openableAreaM2: before.openable_area_m2,
        floorAreaM2: before.floor_area_m2,
      });
      // Recomputed from them with the run's assumption set, every stored figure comes back exactly.
      const expected: Record<string, unknown> = {
        schoolId: stored.school_id,
        blockId: stored.block_id,
        pupils: stored.pupils,
        worstSeason: stored.worst_season,
        meanCo2Ppm: stored.mean_co2_ppm,
        peakCo2Ppm: stored.peak_co2_ppm,
        criteriaMet: stored.criteria_met,
        riskBand: stored.risk_band,
        riskScore: stored.risk_score,
        pupilHoursAbove: stored.pupil_hours_above,
        reason: stored.reason,
        unitsRecommended: stored.units_recommended,
        unitCount: stored.unit_count,
        capitalCostGbp: stored.capital_cost_gbp,
        annualSavingGbp: stored.annual_saving_gbp,
        simplePaybackYears: stored.simple_payback_years,
        discountedPaybackYears: stored.discounted_payback_years,
        npvGbp: stored.npv_gbp,
        baseline: stored.baseline,
        verdict: stored.verdict,
        pupilHoursRemoved: stored.pupil_hours_removed,
        heatingDegreeHoursKh: stored.heating_degree_hours_kh,
        installedCostGbp: stored.installed_cost_gbp,
        lifeYears: stored.life_years,
        unitLines: stored.unit_lines,
      };
      expect(detail.row).toMatchObject(expected);
      expect(detail.assessment.risk.reason).toBe(stored.reason);
      expect(detail.assessment.pupils).toBe(stored.pupils);
      // The detail the list rows do not keep: the CO2 curve of each season.
      for (const season of Object.values(detail.assessment.seasons)) expect(season.curve.length).toBeGreaterThan(10);

      // The room page says the register changed since the run, and the what-if starts from the register as it is.
      const page = await fetch(`${process.env.APP_URL}/app/rooms/${stored.room_id}`, { headers: { cookie: estates } });
      expect(await page.text()).toMatch(/register has changed since the latest run/);
      const whatIf = await api(`/api/rooms/${stored.room_id}/what-if`, {
        method: 'POST',
        cookie: estates,
        body: JSON.stringify({ pupils: 10 }),
      });
      expect(((await whatIf.json()) as { changes: string[] }).changes[0]).toBe(
        `Pupils ${(before.pupils ?? 20) + 3} → 10`,
      );
    } finally {
      await db
        .updateTable('rooms')
        .set({ pupils: before.pupils, openable_area_m2: before.openable_area_m2 })
        .where('id', '=', stored.room_id)
        .execute();
    }
    // Unchanged again, the page shows the run's own figures.
    const page = await fetch(`${process.env.APP_URL}/app/rooms/${stored.room_id}`, { headers: { cookie: estates } });
    expect(await page.text()).toMatch(/From the latest run/);
  });

  it("a school run replaces only that school's current results and re-ranks the whole trust", async () => {
    const before = await currentRows();
    const school = await db
      .selectFrom('schools')
      .select('id')
      .where('trust_id', '=', DEMO_TRUST.id)
      .orderBy('name')
      .limit(1)
      .executeTakeFirstOrThrow();
    const id = await startRun(estates, { scope: 'school', schoolId: school.id });
    const done = await waitForRun(estates, id);
    expect(done.status, done.error).toBe('succeeded');
    const after = await currentRows();
    expect(after.length).toBe(before.length);
    for (const row of after) {
      if (row.school_id === school.id) expect(row.run_id).toBe(id);
      else expect(row.run_id).not.toBe(id);
    }
    const ranks = await ranksNow(estates);
    expect(ranks.map((r) => r.rank).sort((a, b) => a - b)).toEqual(
      Array.from({ length: after.length }, (_, i) => i + 1),
    );
  });

  it('tells listening worker processes about a new run the moment its jobs are committed', async () => {
    // What an idle worker process hears (queue.ts listens on this channel and wakes its workers), on a connection of
    // this test's own.
    const listener = new pg.Client({ connectionString: process.env.DATABASE_URL });
    await listener.connect();
    try {
      await listener.query(`LISTEN ${JOBS_CHANNEL}`);
      const heard: string[] = [];
      let onHeard = () => {};
      listener.on('notification', (n) => {
        heard.push(n.payload ?? '');
        onHeard();
      });
      const id = await startRun(estates, { scope: 'trust' });
      await new Promise<void>((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`no notification for run ${id}; heard ${heard}`)), 10_000);
        onHeard = () => {
          if (heard.includes(id)) {
            clearTimeout(timer);
            resolve();
          }
        };
        onHeard();
      });
      expect((await waitForRun(estates, id)).status).toBe('succeeded');
    } finally {
      await listener.end();
    }
  });

  it('lists recent runs newest first', async () => {
    const response = await api('/api/assessments', { cookie: estates });
    expect(response.status).toBe(200);
    const { runs } = (await response.json()) as { runs: { id: string; createdAt: string }[] };
    expect(runs.length).toBeGreaterThanOrEqual(2);
    const times = runs.map((r) => new Date(r.createdAt).getTime());
    expect([...times].sort((a, b) => b - a)).toEqual(times);
  });

  it('returns 403 when a viewer starts a run, 401 without a session', async () => {
    const viewer = await signIn(DEMO_ACCOUNTS.viewer);
    const forbidden = await api('/api/assessments', {
      method: 'POST',
      cookie: viewer,
      body: JSON.stringify({ scope: 'trust' }),
    });
    expect(forbidden.status).toBe(403);
    expect(((await forbidden.json()) as { error: { code: string } }).error.code).toBe('forbidden');
    const anonymous = await api('/api/assessments', { method: 'POST', body: JSON.stringify({ scope: 'trust' }) });
    expect(anonymous.status).toBe(401);
  });

  it('returns 400 naming the problem for a bad scope', async () => {
    const response = await api('/api/assessments', {
      method: 'POST',
      cookie: estates,
      body: JSON.stringify({ scope: 'school' }),
    });
    expect(response.status).toBe(400);
    const body = (await response.json()) as { error: { code: string; message: string } };
    expect(body.error.message).toMatch(/schoolId|scope/);
  });

  it("hides one trust's runs and schools from another trust (404)", async () => {
    const [run] = await db
      .selectFrom('assessment_runs')
      .select('id')
      .where('trust_id', '=', DEMO_TRUST.id)
      .limit(1)
      .execute();
    const school = await db
      .selectFrom('schools')
      .select('id')
      .where('trust_id', '=', DEMO_TRUST.id)
      .limit(1)
      .executeTakeFirstOrThrow();
    const other = await createOtherTrust();
    expect((await api(`/api/assessments/${run!.id}`, { cookie: other.cookie })).status).toBe(404);
    const post = await api('/api/assessments', {
      method: 'POST',
      cookie: other.cookie,
      body: JSON.stringify({ scope: 'school', schoolId: school.id }),
    });
    expect(post.status).toBe(404);
    const list = (await (await api('/api/assessments', { cookie: other.cookie })).json()) as { runs: unknown[] };
    expect(list.runs).toEqual([]);
  });
});
