import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import { DEMO_TRUST } from '../../scripts/seed/demo-trust';
import { createDb } from '../../src/lib/server/db/client';
import { DEMO_ACCOUNTS, api, createOtherTrust, signIn } from '../helpers/session';

const db = createDb(process.env.DATABASE_URL!);

interface Season {
  occupiedMeanCo2Ppm: number;
  peakCo2Ppm: number;
  ventilation: { totalLps: number; mechanicalLps: number };
  curve: unknown[];
}
interface Assessment {
  worstSeason: 'winter' | 'mid' | 'summer';
  seasons: Record<string, Season>;
  risk: { pupilHoursPerYearAbove: number };
  occupants: number;
  ventilationClass: string;
}
interface Answer {
  current: Assessment;
  whatIf: Assessment;
  changes: string[];
}

/** Counts of every table a what-if could conceivably write to. */
const snapshot = async () => {
  const { rows } = await sql<{ t: string; n: number }>`
    SELECT 'room_results' AS t, count(*)::int AS n FROM room_results UNION ALL
    SELECT 'assessment_runs', count(*)::int FROM assessment_runs UNION ALL
    SELECT 'audit_events', count(*)::int FROM audit_events UNION ALL
    SELECT 'assumption_sets', count(*)::int FROM assumption_sets UNION ALL
    SELECT 'rooms_updated', count(*)::int FROM rooms WHERE updated_at > now() - interval '1 hour'`.execute(db);
  return Object.fromEntries(rows.map((r) => [r.t, r.n]));
};

describe('what-if on a room', () => {
  let viewer: string;
  let room: { id: string; pupils: number | null; openable_area_m2: number | null; glazing_area_m2: number | null };
  beforeAll(async () => {
    viewer = await signIn(DEMO_ACCOUNTS.viewer);
    // A naturally ventilated classroom with pupils and some openable window.
    room = await db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .select(['rooms.id', 'rooms.pupils', 'rooms.openable_area_m2', 'rooms.glazing_area_m2'])
      .where('schools.trust_id', '=', DEMO_TRUST.id)
      .where('rooms.use', '=', 'classroom')
      .where('rooms.ventilation_type', '=', 'natural_single_sided')
      .where('rooms.pupils', '>=', 20)
      .where('rooms.openable_area_m2', '>', 0.5)
      .orderBy('rooms.code')
      .limit(1)
      .executeTakeFirstOrThrow();
  });
  afterAll(async () => {
    await db.destroy();
  });

  const ask = (body: unknown, cookie = viewer, id = room.id) =>
    api(`/api/rooms/${id}/what-if`, { method: 'POST', cookie, body: JSON.stringify(body) });

  it('answers a viewer without writing anything', async () => {
    const before = await snapshot();
    const response = await ask({ pupils: (room.pupils ?? 0) + 10 });
    expect(response.status).toBe(200);
    const answer = (await response.json()) as Answer;
    expect(answer.changes).toEqual([`Pupils ${room.pupils} → ${(room.pupils ?? 0) + 10}`]);
    expect(await snapshot()).toEqual(before);
    // More pupils in the same room: more occupants and never less CO2.
    expect(answer.whatIf.occupants).toBe(answer.current.occupants + 10);
    for (const s of ['winter', 'mid', 'summer']) {
      expect(answer.whatIf.seasons[s]!.occupiedMeanCo2Ppm).toBeGreaterThan(
        answer.current.seasons[s]!.occupiedMeanCo2Ppm,
      );
      expect(answer.whatIf.seasons[s]!.curve.length).toBeGreaterThan(0);
    }
  });

  it('adding catalogue units supplies their nominal flow and lowers winter CO2', async () => {
    const response = await ask({ addUnits: [{ modelId: 'wall-150', count: 2 }] });
    expect(response.status).toBe(200);
    const answer = (await response.json()) as Answer;
    expect(answer.whatIf.ventilationClass).toBe('mechanical');
    // 2 × 150 l/s from the default catalogue's "Wall unit 150".
    expect(answer.whatIf.seasons.winter!.ventilation.mechanicalLps).toBe(300);
    expect(answer.whatIf.seasons.winter!.occupiedMeanCo2Ppm).toBeLessThan(
      answer.current.seasons.winter!.occupiedMeanCo2Ppm,
    );
  });

  it('more openable window never raises summer CO2', async () => {
    const response = await ask({ openableAreaM2: room.glazing_area_m2 });
    expect(response.status).toBe(200);
    const answer = (await response.json()) as Answer;
    expect(answer.whatIf.seasons.summer!.occupiedMeanCo2Ppm).toBeLessThanOrEqual(
      answer.current.seasons.summer!.occupiedMeanCo2Ppm,
    );
  });

  it('returns 400 with a usable message for an unknown unit model, an empty request or an impossible window', async () => {
    const unknown = await ask({ addUnits: [{ modelId: 'no-such-unit', count: 1 }] });
    expect(unknown.status).toBe(400);
    expect(((await unknown.json()) as { error: { message: string } }).error.message).toMatch(/no-such-unit/);
    expect((await ask({})).status).toBe(400);
    const window = await ask({ openableAreaM2: (room.glazing_area_m2 ?? 0) + 5 });
    expect(window.status).toBe(400);
    expect(((await window.json()) as { error: { message: string } }).error.message).toMatch(/glazing/);
  });

  it("returns 404 for another trust's room and 401 without a session", async () => {
    const other = await createOtherTrust();
    expect((await ask({ pupils: 5 }, other.cookie)).status).toBe(404);
    expect(
      (await api(`/api/rooms/${room.id}/what-if`, { method: 'POST', body: JSON.stringify({ pupils: 5 }) })).status,
    ).toBe(401);
  });
});
