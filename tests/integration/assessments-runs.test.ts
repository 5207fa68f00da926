import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import { DEMO_SCHOOLS, DEMO_TRUST, demoRooms } from '../../scripts/seed/demo-trust';
import { createDb } from '../../src/lib/server/db/client';
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

async function waitForRun(cookie: string, id: string): Promise<RunStatus> {
  const deadline = Date.now() + 45_000;
  for (;;) {
    const response = await api(`/api/assessments/${id}`, { cookie });
    expect(response.status).toBe(200);
    const body = (await response.json()) as RunStatus;
    if (body.status === 'succeeded' || body.status === 'failed') return body;
    if (Date.now() > deadline) throw new Error(`run ${id} still ${body.status} after 45 s`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

async function startRun(cookie: string, body: unknown): Promise<string> {
  const response = await api('/api/assessments', { method: 'POST', cookie, body: JSON.stringify(body) });
  expect(response.status, await response.clone().text()).toBe(202);
  return ((await response.json()) as { id: string }).id;
}

const currentRows = () =>
  db
    .selectFrom('room_results')
    .select(['run_id', 'room_id', 'school_id', 'risk_band', 'baseline', 'heating_fuel', 'fuel_price_gbp_per_kwh'])
    .where('trust_id', '=', DEMO_TRUST.id)
    .where('is_current', '=', true)
    .execute();

/** The trust's ranks as every page reads them (portfolio_ranks, rebuilt on the first read after a run). */
async function ranksNow(cookie: string) {
  const response = await api('/api/priorities?pageSize=1', { cookie });
  expect(response.status).toBe(200);
  return db
    .selectFrom('portfolio_ranks')
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

  it('fills every denormalised column a portfolio view reads', async () => {
    const row = await db
      .selectFrom('room_results')
      .innerJoin('rooms', 'rooms.id', 'room_results.room_id')
      .select([
        'room_results.pupils',
        'rooms.pupils as room_pupils',
        'room_results.ventilation_type',
        'rooms.ventilation_type as room_vent',
        'room_results.units_recommended',
        'room_results.unit_count',
        'room_results.detail',
        'room_results.reason',
      ])
      .where('room_results.trust_id', '=', DEMO_TRUST.id)
      .where('room_results.is_current', '=', true)
      .where('room_results.unit_count', '>', 0)
      .limit(1)
      .executeTakeFirstOrThrow();
    expect(row.pupils).toBe(row.room_pupils);
    expect(row.ventilation_type).toBe(row.room_vent);
    expect(row.units_recommended).toMatch(/^\d+ × .+/);
    expect(row.reason.length).toBeGreaterThan(10);
    const detail = row.detail as { seasons: Record<string, { curve: unknown[] }>; appraisal: unknown };
    expect(detail.appraisal).not.toBeNull();
    for (const season of Object.values(detail.seasons)) expect(season.curve).toEqual([]);
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
