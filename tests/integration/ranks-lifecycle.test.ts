/**
 * The trust's ranks as rows of generations (portfolio_ranks) and the run's room snapshot, without per-row foreign
 * keys: a rebuild records its build, writes a new generation and switches readers to it; deleting a room, a school, a
 * run or a trust takes its rows with it (statement-level triggers instead of the keys).
 */
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { api, createOtherTrust } from '../helpers/session';
import { insertAssessedRooms } from './portfolio-fixture';

const db = testDb();
afterAll(async () => {
  await db.destroy();
});

const SCHOOLS = 3;
const ROOMS_PER_SCHOOL = 20;

interface PrioritiesBody {
  rows: { roomId: string; rank: number; schoolId: string }[];
  total: number;
}

async function priorities(cookie: string, query = 'pageSize=200'): Promise<PrioritiesBody> {
  const response = await api(`/api/priorities?${query}`, { cookie });
  expect(response.status).toBe(200);
  return (await response.json()) as PrioritiesBody;
}

/** Rank rows of the trust in every generation, by generation. */
async function rowsByGeneration(trustId: string): Promise<Map<number, number>> {
  const { rows } = await sql<{ generation: number; n: number }>`
    SELECT generation, count(*)::int AS n FROM portfolio_ranks WHERE trust_id = ${trustId} GROUP BY generation`.execute(
    db,
  );
  return new Map(rows.map((r) => [Number(r.generation), r.n]));
}

/** The generation readers of the trust are on. */
async function rankedGeneration(trustId: string): Promise<number> {
  const row = await db
    .selectFrom('portfolio_settings')
    .select('ranked_generation')
    .where('trust_id', '=', trustId)
    .executeTakeFirstOrThrow();
  return Number(row.ranked_generation);
}

async function saveWeights(cookie: string, weights: { risk: number; costEffectiveness: number; payback: number }) {
  const response = await api('/api/priorities/weights', { method: 'PUT', cookie, body: JSON.stringify(weights) });
  expect(response.status).toBe(200);
}

describe('ranks as generations', () => {
  let cookie: string;
  let trustId: string;
  let schoolIds: string[];
  let runId: string;

  beforeAll(async () => {
    ({ cookie, trustId } = await createOtherTrust());
    ({ schoolIds, runId } = await insertAssessedRooms(db, {
      trustId,
      createTrust: false,
      schools: SCHOOLS,
      roomsPerSchool: ROOMS_PER_SCHOOL,
      label: 'Generations',
    }));
  });

  it('lists every room once with ranks 1…n, and keeps at most the generation before beside the current one', async () => {
    const first = await priorities(cookie);
    expect(first.total).toBe(SCHOOLS * ROOMS_PER_SCHOOL);
    expect(first.rows.map((r) => r.rank)).toEqual(Array.from({ length: SCHOOLS * ROOMS_PER_SCHOOL }, (_, i) => i + 1));
    expect([...(await rowsByGeneration(trustId)).values()]).toEqual([SCHOOLS * ROOMS_PER_SCHOOL]);

    // Two rebuilds (new weights each time): readers see one generation, the table holds it and the one before.
    await saveWeights(cookie, { risk: 0.2, costEffectiveness: 0.2, payback: 0.6 });
    await saveWeights(cookie, { risk: 0.9, costEffectiveness: 0.05, payback: 0.05 });
    const generations = await rowsByGeneration(trustId);
    expect([...generations.values()]).toEqual([SCHOOLS * ROOMS_PER_SCHOOL, SCHOOLS * ROOMS_PER_SCHOOL]);
    const settings = await db
      .selectFrom('portfolio_settings')
      .select('ranked_generation')
      .where('trust_id', '=', trustId)
      .executeTakeFirstOrThrow();
    expect(Math.max(...generations.keys())).toBe(Number(settings.ranked_generation));
    const after = await priorities(cookie);
    expect(after.total).toBe(SCHOOLS * ROOMS_PER_SCHOOL);
    expect(new Set(after.rows.map((r) => r.roomId)).size).toBe(SCHOOLS * ROOMS_PER_SCHOOL);
  });

  it('removes the rows a failed rebuild left at the next rebuild, and keeps the generation readers were on', async () => {
    // What a rebuild that failed after writing leaves: its build, committed first, and rows nobody reads.
    const { generation: left } = await db
      .insertInto('portfolio_rank_builds')
      .values({ trust_id: trustId })
      .returning('generation')
      .executeTakeFirstOrThrow();
    await sql`
      INSERT INTO portfolio_ranks (trust_id, generation, room_id, school_id, run_id, rank, score)
      SELECT trust_id, ${left}, room_id, school_id, run_id, rank, score FROM current_portfolio_ranks
      WHERE trust_id = ${trustId}`.execute(db);
    const readBefore = await rankedGeneration(trustId);
    expect((await rowsByGeneration(trustId)).get(Number(left))).toBe(SCHOOLS * ROOMS_PER_SCHOOL);

    await saveWeights(cookie, { risk: 0.5, costEffectiveness: 0.3, payback: 0.2 });
    const now = await rankedGeneration(trustId);
    expect(now).toBeGreaterThan(Number(left));
    const generations = await rowsByGeneration(trustId);
    expect([...generations.keys()].sort((a, b) => a - b)).toEqual([readBefore, now]);
    const builds = await db
      .selectFrom('portfolio_rank_builds')
      .select('generation')
      .where('trust_id', '=', trustId)
      .orderBy('generation')
      .execute();
    expect(builds.map((b) => Number(b.generation))).toEqual([readBefore, now]);
  });

  it('drops a deleted room from the list and from every generation, and ranks the rest 1…n again', async () => {
    const before = await priorities(cookie);
    const victim = before.rows[4]!;
    const deleted = await api(`/api/rooms/${victim.roomId}`, { method: 'DELETE', cookie });
    expect(deleted.status).toBe(204);
    const after = await priorities(cookie);
    expect(after.total).toBe(before.total - 1);
    expect(after.rows.some((r) => r.roomId === victim.roomId)).toBe(false);
    // Ranked again without it: no gap where it stood.
    expect(after.rows.map((r) => r.rank)).toEqual(Array.from({ length: before.total - 1 }, (_, i) => i + 1));
    const left = await db
      .selectFrom('portfolio_ranks')
      .select('generation')
      .where('room_id', '=', victim.roomId)
      .execute();
    expect(left).toEqual([]);
  });

  it('drops a removed school’s rooms from every generation', async () => {
    const school = schoolIds[1]!;
    const removed = await api(`/api/schools/${school}`, { method: 'DELETE', cookie });
    expect(removed.status).toBe(200);
    const left = await db.selectFrom('portfolio_ranks').select('room_id').where('school_id', '=', school).execute();
    expect(left).toEqual([]);
    const after = await priorities(cookie);
    expect(after.rows.some((r) => r.schoolId === school)).toBe(false);
  });

  it('takes a deleted run’s room snapshot with it', async () => {
    const rooms = await db.selectFrom('rooms').select('id').where('school_id', '=', schoolIds[0]!).execute();
    const ids = rooms.map((r) => r.id).sort();
    await db
      .insertInto('assessment_run_chunks')
      .values({ run_id: runId, chunk_no: 0, last_room_id: ids[ids.length - 1]!, rooms: ids.length, room_ids: ids })
      .execute();
    expect(await snapshotRows(runId)).toBe(rooms.length);
    await db.deleteFrom('assessment_runs').where('id', '=', runId).execute();
    expect(await snapshotRows(runId)).toBe(0);
  });

  it('takes every rank row of a deleted trust with it', async () => {
    expect((await rowsByGeneration(trustId)).size).toBeGreaterThan(0);
    await db.deleteFrom('trusts').where('id', '=', trustId).execute();
    expect((await rowsByGeneration(trustId)).size).toBe(0);
    const builds = await db.selectFrom('portfolio_rank_builds').select('generation').where('trust_id', '=', trustId);
    expect(await builds.execute()).toEqual([]);
  });
});

async function snapshotRows(runId: string): Promise<number> {
  const row = await db
    .selectFrom('assessment_run_chunks')
    .select(sql<number>`coalesce(sum(cardinality(room_ids)), 0)::int`.as('n'))
    .where('run_id', '=', runId)
    .executeTakeFirstOrThrow();
  return row.n;
}
