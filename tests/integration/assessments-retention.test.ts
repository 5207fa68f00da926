// The retention rule (issue 16): a trust admin chooses how many of the latest succeeded runs keep their results;
// older runs lose their result rows, room snapshots and input snapshots, but stay in the history. Kept whatever the
// rule: a run whose results are still current for some school, a run a saved capital programme was planned from, and
// runs not finished yet.
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getCurrentAssumptionSet } from '../../src/lib/server/assessments/assumptions.repository';
import { workRunHere } from '../../src/lib/server/assessments/run-executor';
import { insertRun, markFailed } from '../../src/lib/server/assessments/runs.repository';
import { getDb, getPool } from '../../src/lib/server/db/client';
import { bigTrust, type BigTrust } from '../helpers/big-trust';
import { api } from '../helpers/session';

const db = getDb();
let trust: BigTrust;

afterAll(async () => {
  await db.destroy();
});

/** A run of the trust (or one school) worked to the end in this process; its id. */
async function run(schoolId: string | null = null, work = true): Promise<string> {
  const assumptions = await getCurrentAssumptionSet(db, trust.trustId);
  const { id } = await insertRun(db, {
    trustId: trust.trustId,
    schoolId,
    assumptionSetId: assumptions.id,
    assumptionsVersion: assumptions.label,
    startedByUserId: null,
    startedByEmail: 'retention-test@test.airtally.test',
  });
  if (work) await workRunHere(db, getPool(), id);
  return id;
}

/** What a run still holds: result rows, chunks with input snapshots, the chunks' room ids, dashboard figures. */
async function holdings(runId: string) {
  const { rows } = await sql<{ results: number; chunks: number; inputs: number; rooms: number; summaries: number }>`
    SELECT (SELECT count(*)::int FROM room_results WHERE run_id = ${runId}::uuid) AS results,
      (SELECT count(*)::int FROM assessment_run_chunks WHERE run_id = ${runId}::uuid) AS chunks,
      (SELECT count(*)::int FROM assessment_run_chunks WHERE run_id = ${runId}::uuid AND inputs IS NOT NULL) AS inputs,
      (SELECT coalesce(sum(cardinality(room_ids)), 0)::int FROM assessment_run_chunks WHERE run_id = ${runId}::uuid) AS rooms,
      (SELECT count(*)::int FROM run_school_summaries WHERE run_id = ${runId}::uuid) AS summaries`.execute(db);
  return rows[0]!;
}

const runRow = (id: string) =>
  db
    .selectFrom('assessment_runs')
    .select(['status', 'results_pruned_at', 'rooms_total'])
    .where('id', '=', id)
    .executeTakeFirstOrThrow();

const setRetention = (keepRuns: unknown) =>
  api('/api/assessments/retention', {
    method: 'PUT',
    cookie: trust.cookie,
    body: JSON.stringify({ keepRuns }),
  });

describe('the retention rule', () => {
  const ids: Record<string, string> = {};

  beforeAll(async () => {
    // 2 schools × 30 rooms. Run by run, oldest first:
    trust = await bigTrust(db, 60, 2);
    ids.planned = await run(); // a capital programme is planned from it (below)
    const created = await api('/api/programmes', {
      method: 'POST',
      cookie: trust.cookie,
      body: JSON.stringify({
        name: 'Planned from the first run',
        settings: {
          yearConvention: 'sep_aug',
          firstYear: 2027,
          budgetsGbp: [100_000],
          onCosts: {
            preliminariesRate: 0.1,
            feesRate: 0.12,
            contingencyRate: 0.1,
            inflationRatePerYear: 0.035,
            vatRate: 0.2,
            vatRecoverable: true,
          },
          windows: [
            { id: 'october', workingDays: 5 },
            { id: 'february', workingDays: 5 },
            { id: 'easter', workingDays: 8 },
            { id: 'summer', workingDays: 25 },
          ],
          unitsPerWorkingDay: 2,
          mobilisationGbp: 2000,
        },
      }),
    });
    expect(created.status, await created.clone().text()).toBe(201);
    ids.programme = ((await created.json()) as { programme: { id: string } }).programme.id;
    ids.old = await run(); // superseded everywhere, cited by nothing: its results go
    ids.currentForSchool0 = await run(); // still current for school 0 after the next run
    ids.latest = await run(trust.schoolIds[1]!); // school 1 only: the latest run
    ids.failed = await run(null, false);
    await markFailed(db, ids.failed, 'Test: failed run.');
  }, 120_000);

  it('keeps 10 runs by default, so four succeeded runs all keep their results', async () => {
    const response = await api('/api/assessments/retention', { cookie: trust.cookie });
    expect(await response.json()).toMatchObject({ keepRuns: 10, isDefault: true });
    for (const id of [ids.planned, ids.old, ids.currentForSchool0, ids.latest])
      expect((await runRow(id!)).results_pruned_at).toBeNull();
    // 60 rooms in the trust-wide runs, 30 in the one-school run.
    expect((await holdings(ids.old!)).rooms).toBe(60);
    expect((await holdings(ids.latest!)).rooms).toBe(30);
  });

  it('refuses to keep no runs, and prunes nothing then', async () => {
    const response = await setRetention(0);
    expect(response.status).toBe(400);
    expect(((await response.json()) as { error: { message: string } }).error.message).toMatch(/at least the latest/);
    expect((await runRow(ids.old!)).results_pruned_at).toBeNull();
  });

  it('with "keep the latest 1", prunes only the run nothing needs: not current, not planned from, not unfinished', async () => {
    // A run not finished yet (queued; failed at the end of this check, before the app's sweep would send it jobs).
    ids.queued = await run(null, false);
    const before = {
      planned: await holdings(ids.planned!),
      current: await holdings(ids.currentForSchool0!),
      latest: await holdings(ids.latest!),
      queued: await holdings(ids.queued!),
    };
    const response = await setRetention(1);
    expect(response.status, await response.clone().text()).toBe(200);
    // The old run and the failed run (whose results were already removed when it failed).
    expect(((await response.json()) as { prunedRuns: number }).prunedRuns).toBe(2);

    // The old run is still in the history, marked, with nothing left of its results.
    const old = await runRow(ids.old!);
    expect(old.status).toBe('succeeded');
    expect(old.results_pruned_at).not.toBeNull();
    expect(await holdings(ids.old!)).toEqual({ results: 0, chunks: 0, inputs: 0, rooms: 0, summaries: 0 });
    expect((await runRow(ids.failed!)).results_pruned_at).not.toBeNull();

    // Everything else holds what it held.
    expect(await holdings(ids.planned!)).toEqual(before.planned);
    expect(await holdings(ids.currentForSchool0!)).toEqual(before.current);
    expect(await holdings(ids.latest!)).toEqual(before.latest);
    expect(await holdings(ids.queued!)).toEqual(before.queued);
    await markFailed(db, ids.queued!, 'Test: unfinished run checked.');
    for (const kept of [before.planned, before.current, before.latest]) {
      expect(kept.results).toBeGreaterThan(0);
      expect(kept.inputs).toBe(kept.chunks);
    }
    expect(before.queued.rooms).toBe(60);
    expect(before.queued.chunks).toBeGreaterThan(0);
    for (const id of [ids.planned, ids.currentForSchool0, ids.latest, ids.queued])
      expect((await runRow(id!)).results_pruned_at).toBeNull();

    // Each school still reads its current run's results.
    const current = await db
      .selectFrom('assessment_current')
      .select(['school_id', 'run_id'])
      .where('trust_id', '=', trust.trustId)
      .execute();
    expect(new Map(current.map((c) => [c.school_id, c.run_id]))).toEqual(
      new Map([
        [trust.schoolIds[0]!, ids.currentForSchool0],
        [trust.schoolIds[1]!, ids.latest],
      ]),
    );

    // One audit event names the pruned runs.
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'after'])
      .where('trust_id', '=', trust.trustId)
      .where('action', 'in', ['assessment.runs_pruned', 'assessment.retention_set'])
      .execute();
    expect(audit.map((a) => a.action).sort()).toEqual(['assessment.retention_set', 'assessment.runs_pruned']);
    const pruned = audit.find((a) => a.action === 'assessment.runs_pruned')!.after as { runIds: string[] };
    expect([...pruned.runIds].sort()).toEqual([ids.old, ids.failed].sort());
  });

  it('prunes the planned-from run once its programme is deleted, and a superseded run once a newer one finishes', async () => {
    const deleted = await api(`/api/programmes/${ids.programme}`, { method: 'DELETE', cookie: trust.cookie });
    expect(deleted.status).toBeLessThan(300);
    // A new trust-wide run: the run current for school 0 is superseded and beyond "the latest 1"; the planned-from
    // run is cited by nothing now. Both go when the new run finishes.
    const newest = await run();
    expect((await holdings(ids.planned!)).results).toBe(0);
    expect((await runRow(ids.planned!)).results_pruned_at).not.toBeNull();
    expect((await holdings(ids.currentForSchool0!)).results).toBe(0);
    expect((await holdings(ids.latest!)).results).toBe(0);
    expect((await holdings(newest)).results).toBeGreaterThan(0);
  });
});
