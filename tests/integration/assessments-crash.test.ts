// Runs that recover (issue 17, item 5): a worker killed mid-run, a worker gone silent elsewhere, the app
// server itself killed, the last attempt, the rooms fixed at the start, and trusts not waiting on each other.
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { type RawBuilder, sql } from 'kysely';
import { afterAll, describe, expect, it } from 'vitest';
import { getDb, getPool } from '../../src/lib/server/db/client';
import { getCurrentAssumptionSet } from '../../src/lib/server/assessments/assumptions.repository';
import { attemptRun, executeRun, MAX_ATTEMPTS } from '../../src/lib/server/assessments/run-executor';
import { getRun, insertRun, markFailed, type Run } from '../../src/lib/server/assessments/runs.repository';
import { bigTrust, type BigTrust } from '../helpers/big-trust';
import { api } from '../helpers/session';

const db = getDb();
const pool = getPool();
afterAll(async () => {
  await db.destroy();
});

/** Reads until `done` holds; throws with the last value read once `timeoutMs` has passed. */
async function until<T>(
  read: () => Promise<T>,
  done: (value: T) => boolean,
  timeoutMs: number,
  what: string,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await read();
    if (done(value)) return value;
    if (Date.now() > deadline)
      throw new Error(`${what} within ${timeoutMs / 1000} s; last seen: ${JSON.stringify(value)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

const runOf = async (id: string) => (await getRun(db, id, null))!;
const finished = (run: Run) => run.status === 'succeeded' || run.status === 'failed';

async function newRun(trustId: string): Promise<{ id: string; roomsTotal: number }> {
  const assumptions = await getCurrentAssumptionSet(db, trustId);
  return insertRun(db, {
    trustId,
    schoolId: null,
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
const currentRunIds = async (trustId: string) =>
  (
    await db
      .selectFrom('room_results')
      .select('run_id')
      .distinct()
      .where('trust_id', '=', trustId)
      .where('is_current', '=', true)
      .execute()
  ).map((r) => r.run_id);

/** Makes a run look as a worker elsewhere leaves it: running, one attempt made, its last heartbeat at `beatAt`. */
const heldBy = (runId: string, workerId: string, beatAt: RawBuilder<Date>) =>
  db
    .updateTable('assessment_runs')
    .set({ status: 'running', worker_id: workerId, attempts: 1, heartbeat_at: beatAt })
    .where('id', '=', runId)
    .execute();

/** Starts a run through the API as the trust's admin. */
async function startRun(trust: BigTrust): Promise<string> {
  const response = await api('/api/assessments', {
    method: 'POST',
    cookie: trust.cookie,
    body: JSON.stringify({ scope: 'trust' }),
  });
  expect(response.status).toBe(202);
  return ((await response.json()) as { id: string }).id;
}

describe('a run whose worker dies', () => {
  it('is resumed by the app within a minute when its worker process is killed, and completes without duplicates', async () => {
    const trust = await bigTrust(db, 400, 2);
    const previous = await newRun(trust.trustId);
    expect(await executeRun(db, pool, previous.id)).toBe(true);
    const run = await newRun(trust.trustId);
    // Node itself with tsx's loader (the tsx command would run the worker in a grandchild a kill does not reach).
    const child = spawn(
      process.execPath,
      ['--import', 'tsx', join('tests', 'integration', 'assessments-crash-worker.ts'), run.id],
      { cwd: process.cwd(), env: process.env, stdio: 'ignore' },
    );
    const exited = new Promise<NodeJS.Signals | null>((resolve) =>
      child.on('exit', (_code, signal) => resolve(signal)),
    );
    // Killed once it has committed at least two chunks (25 rooms each) but not the whole run.
    await until(
      () => runOf(run.id),
      (r) => r.roomsDone >= 50,
      30_000,
      'The worker did not commit two chunks',
    );
    child.kill('SIGKILL');
    expect(await exited).toBe('SIGKILL');
    const killedAt = Date.now();

    const crashed = await runOf(run.id);
    expect(crashed.roomsDone).toBeLessThan(run.roomsTotal);
    // Only whole chunks were written, none of them current; the views still read the previous run alone.
    expect(crashed.roomsDone % 25).toBe(0);
    expect(await countRows(run.id, true)).toBe(0);
    expect(await currentRunIds(trust.trustId)).toEqual([previous.id]);

    const done = await until(() => runOf(run.id), finished, 60_000, 'The run was not resumed and finished');
    expect(Date.now() - killedAt).toBeLessThan(60_000);
    expect(done.status).toBe('succeeded');
    expect(done.attempts).toBe(2);
    expect(done.roomsDone).toBe(run.roomsTotal);
    expect(await countRows(run.id)).toBe(run.roomsTotal - done.problems.length);
    expect(await countRows(run.id, true)).toBe(run.roomsTotal - done.problems.length);
    expect(await currentRunIds(trust.trustId)).toEqual([run.id]);
  }, 120_000);

  it('is resumed within a minute when its worker on another machine falls silent', async () => {
    const trust = await bigTrust(db, 120, 2);
    const run = await newRun(trust.trustId);
    // As a worker elsewhere would leave it: running, one attempt made, its last heartbeat long ago.
    await heldBy(run.id, 'another-host/4242/dead0000', sql`now() - interval '2 minutes'`);
    const done = await until(() => runOf(run.id), finished, 60_000, 'The silent run was not resumed');
    expect(done.status).toBe('succeeded');
    expect(done.attempts).toBe(2);
    expect(await countRows(run.id, true)).toBe(run.roomsTotal - done.problems.length);
  }, 90_000);

  it('is left to its worker while that worker keeps beating', async () => {
    const trust = await bigTrust(db, 40, 1);
    const run = await newRun(trust.trustId);
    await heldBy(run.id, 'another-host/4243/alive000', sql`now()`);
    expect(await executeRun(db, pool, run.id)).toBe(false);
    const untouched = await runOf(run.id);
    expect(untouched).toMatchObject({
      status: 'running',
      workerId: 'another-host/4243/alive000',
      attempts: 1,
      roomsDone: 0,
    });
    await markFailed(db, run.id, 'Test over.');
  });

  it('fails cleanly after its last attempt: status failed with the reason, its rows removed, current results kept', async () => {
    const trust = await bigTrust(db, 200, 2);
    const previous = await newRun(trust.trustId);
    await executeRun(db, pool, previous.id);
    const run = await newRun(trust.trustId);
    const crash = () => {
      throw new Error('simulated worker fault');
    };
    for (let attempt = 1; attempt < MAX_ATTEMPTS; attempt++) {
      expect(await attemptRun(db, pool, run.id, { chunkSize: 25, afterChunk: crash })).toMatchObject({ next: 'retry' });
      expect((await runOf(run.id)).status).toBe('running');
    }
    expect(await attemptRun(db, pool, run.id, { chunkSize: 25, afterChunk: crash })).toEqual({ next: 'failed' });
    const failed = await runOf(run.id);
    expect(failed.status).toBe('failed');
    expect(failed.attempts).toBe(MAX_ATTEMPTS);
    expect(failed.error).toContain('simulated worker fault');
    expect(failed.finishedAt).not.toBeNull();
    expect(await countRows(run.id)).toBe(0);
    expect(await currentRunIds(trust.trustId)).toEqual([previous.id]);
  });
});

describe('the rooms a run assesses', () => {
  it('are the rooms in scope when it started: rooms added later wait for the next run, deleted ones are skipped', async () => {
    const trust = await bigTrust(db, 60, 2);
    const run = await newRun(trust.trustId);
    expect(run.roomsTotal).toBe(60);
    const later = await db
      .insertInto('rooms')
      .values({
        school_id: trust.schoolIds[0]!,
        code: 'ADDED-LATER',
        name: 'Added after the run started',
        use: 'classroom',
        floor_area_m2: 55,
        ceiling_height_m: 2.7,
        pupils: 30,
        adults: 1,
        age_group: 'secondary',
        glazing_area_m2: 8,
        openable_area_m2: 2,
        window_type: 'side_hung',
        ventilation_type: 'natural_single_sided',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const gone = await db
      .deleteFrom('rooms')
      .where('school_id', '=', trust.schoolIds[1]!)
      .where('code', '=', 'R000001')
      .returning('id')
      .executeTakeFirstOrThrow();
    expect(await executeRun(db, pool, run.id, { chunkSize: 7 })).toBe(true);
    const done = await runOf(run.id);
    expect(done.status).toBe('succeeded');
    expect(done.roomsDone).toBe(60);
    const assessed = await db.selectFrom('room_results').select('room_id').where('run_id', '=', run.id).execute();
    const ids = new Set(assessed.map((r) => r.room_id));
    expect(ids.size).toBe(59 - done.problems.length);
    expect(ids.has(later.id)).toBe(false);
    expect(ids.has(gone.id)).toBe(false);
  });
});

describe('runs of several trusts', () => {
  it("do not wait on one trust's long run", async () => {
    const large = await bigTrust(db, 15_000, 3);
    const small = await bigTrust(db, 30, 1);
    const long = await startRun(large);
    await until(
      () => runOf(long),
      (r) => r.roomsDone > 0,
      60_000,
      'The long run did not start',
    );
    const short = await startRun(small);
    const shortDone = await until(() => runOf(short), finished, 60_000, 'The short run did not finish');
    expect(shortDone.status).toBe('succeeded');
    // The long run of the other trust is still going: the short one did not queue behind it.
    expect((await runOf(long)).status).toBe('running');
    await until(() => runOf(long), finished, 120_000, 'The long run did not finish');
  }, 240_000);
});

describe('the app server killed during a run', () => {
  it('is started again, and resumes the interrupted run within a minute', async () => {
    const trust = await bigTrust(db, 15_000, 3);
    const pidFile = process.env.APP_PID_FILE ?? '';
    const appPid = Number(readFileSync(pidFile, 'utf8'));
    const id = await startRun(trust);
    await until(
      () => runOf(id),
      (r) => r.roomsDone > 0,
      60_000,
      'The run did not start',
    );
    process.kill(appPid, 'SIGKILL');
    const killedAt = Date.now();
    const interrupted = await runOf(id);
    expect(finished(interrupted)).toBe(false);

    // npm test's supervisor (like npm start's) starts the server again; PostgreSQL and the fakes stayed up.
    await until(
      async () => {
        const pid = Number(readFileSync(pidFile, 'utf8'));
        const health = await api('/api/health').then(
          (r) => r.status,
          () => 0,
        );
        return { pid, health };
      },
      (s) => s.pid !== appPid && s.health === 200,
      30_000,
      'The app server was not started again',
    );
    const done = await until(() => runOf(id), finished, 60_000, 'The interrupted run was not resumed and finished');
    expect(Date.now() - killedAt).toBeLessThan(60_000);
    expect(done.status).toBe('succeeded');
    expect(done.attempts).toBe(2);
    expect(done.roomsDone).toBe(done.roomsTotal);
    expect(await countRows(id, true)).toBe(done.roomsTotal - done.problems.length);
  }, 180_000);
});
