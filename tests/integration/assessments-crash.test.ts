import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { join } from 'node:path';
import { sql } from 'kysely';
import { DEMO_TRUST } from '../../db/seed/demo-trust';
import { getDb } from '../../src/lib/server/db/client';
import { getCurrentAssumptionSet } from '../../src/lib/server/assessments/assumptions.repository';
import { countRoomsInScope } from '../../src/lib/server/assessments/engine-input.repository';
import { attemptRun, executeRun } from '../../src/lib/server/assessments/run-executor';
import { getRun, insertRun } from '../../src/lib/server/assessments/runs.repository';
import { DEMO_ACCOUNTS, api, signIn } from '../helpers/session';

// These runs are created without a queue job, so the app's worker never picks them up: the test plays
// the worker itself (a child process it kills, then a resumed attempt in this process).
const db = getDb();
const scope = { trustId: DEMO_TRUST.id, schoolId: null };

async function newRun(): Promise<string> {
  const assumptions = await getCurrentAssumptionSet(db, DEMO_TRUST.id);
  return insertRun(db, {
    trustId: DEMO_TRUST.id,
    schoolId: null,
    roomsTotal: await countRoomsInScope(db, scope),
    assumptionSetId: assumptions.id,
    assumptionsVersion: assumptions.label,
    startedByUserId: null,
    startedByEmail: 'crash-test@test.airtally.test',
  });
}

const countRows = async (runId: string, currentOnly = false) => {
  let q = db.selectFrom('room_results').select(sql<number>`count(*)::int`.as('n')).where('run_id', '=', runId);
  if (currentOnly) q = q.where('is_current', '=', true);
  return (await q.executeTakeFirstOrThrow()).n;
};
const currentRunIds = async () =>
  (
    await db
      .selectFrom('room_results')
      .select('run_id')
      .distinct()
      .where('trust_id', '=', DEMO_TRUST.id)
      .where('is_current', '=', true)
      .execute()
  ).map((r) => r.run_id);

describe('a crashed assessment worker', () => {
  let previousRunId: string;
  let rooms: number;

  beforeAll(async () => {
    // A finished run through the API, so there are current results a crash must not disturb.
    const cookie = await signIn(DEMO_ACCOUNTS.trust_admin);
    const response = await api('/api/assessments', {
      method: 'POST',
      cookie,
      body: JSON.stringify({ scope: 'trust' }),
    });
    previousRunId = ((await response.json()) as { id: string }).id;
    for (let i = 0; i < 200; i += 1) {
      const run = await getRun(db, previousRunId, DEMO_TRUST.id);
      if (run?.status === 'succeeded') break;
      await new Promise((r) => setTimeout(r, 200));
    }
    rooms = await countRoomsInScope(db, scope);
  });
  afterAll(async () => {
    await db.destroy();
  });

  it('killed midway leaves the previous results current, and the resumed run completes without duplicates', async () => {
    expect(await currentRunIds()).toEqual([previousRunId]);
    const runId = await newRun();
    const child = spawn(
      join(process.cwd(), 'node_modules', '.bin', 'tsx'),
      [join('tests', 'integration', 'assessments-crash-worker.ts'), runId],
      {
        cwd: process.cwd(),
        env: process.env,
        stdio: 'ignore',
      },
    );
    const exited = new Promise<NodeJS.Signals | null>((resolve) =>
      child.on('exit', (_code, signal) => resolve(signal)),
    );
    // Kill the worker once it has committed at least two chunks (25 rooms each) but not the whole run.
    for (let i = 0; i < 300; i += 1) {
      const run = await getRun(db, runId, DEMO_TRUST.id);
      if (run && run.roomsDone >= 50) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    child.kill('SIGKILL');
    expect(await exited).toBe('SIGKILL');

    const crashed = (await getRun(db, runId, DEMO_TRUST.id))!;
    expect(crashed.status).toBe('running');
    expect(crashed.roomsDone).toBeGreaterThanOrEqual(50);
    expect(crashed.roomsDone).toBeLessThan(rooms);
    // Only whole chunks were written, none of them current; the views still read the previous run alone.
    expect(crashed.roomsDone % 25).toBe(0);
    expect(await countRows(runId)).toBe(crashed.roomsDone - crashed.problems.length);
    expect(await countRows(runId, true)).toBe(0);
    expect(await currentRunIds()).toEqual([previousRunId]);

    // The queue's retry resumes after the last committed chunk.
    await executeRun(runId);
    const resumed = (await getRun(db, runId, DEMO_TRUST.id))!;
    expect(resumed.status).toBe('succeeded');
    expect(resumed.roomsDone).toBe(rooms);
    expect(await countRows(runId)).toBe(rooms - resumed.problems.length);
    expect(await countRows(runId, true)).toBe(rooms - resumed.problems.length);
    expect(await currentRunIds()).toEqual([runId]);
    expect(await countRows(previousRunId, true)).toBe(0);
  });

  it('fails cleanly on its last attempt: status failed with the reason, its rows removed, current results untouched', async () => {
    const before = await currentRunIds();
    const runId = await newRun();
    const crash = () => {
      throw new Error('simulated worker fault');
    };
    await expect(
      attemptRun(runId, { retryCount: 2, retryLimit: 2 }, { chunkSize: 25, afterChunk: crash }),
    ).rejects.toThrow('simulated worker fault');
    const failed = (await getRun(db, runId, DEMO_TRUST.id))!;
    expect(failed.status).toBe('failed');
    expect(failed.error).toContain('simulated worker fault');
    expect(failed.finishedAt).not.toBeNull();
    expect(await countRows(runId)).toBe(0);
    expect(await currentRunIds()).toEqual(before);
  });

  it('keeps a run resumable (still running) when a retry remains', async () => {
    const runId = await newRun();
    const crash = () => {
      throw new Error('transient fault');
    };
    await expect(
      attemptRun(runId, { retryCount: 0, retryLimit: 2 }, { chunkSize: 25, afterChunk: crash }),
    ).rejects.toThrow('transient fault');
    const paused = (await getRun(db, runId, DEMO_TRUST.id))!;
    expect(paused.status).toBe('running');
    expect(paused.error).toContain('transient fault');
    await attemptRun(runId, { retryCount: 1, retryLimit: 2 });
    expect((await getRun(db, runId, DEMO_TRUST.id))!.status).toBe('succeeded');
    expect(await currentRunIds()).toEqual([runId]);
  });
});
