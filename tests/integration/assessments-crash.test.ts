// Runs split into chunks that worker processes take (issue 16), and runs that recover (issue 17): two worker
// processes give the same results as one; a worker killed while it holds a chunk loses only that chunk, which another
// worker finishes within a minute; a silent worker on another machine; the last attempt; the rooms fixed at the
// start; trusts not waiting on each other; the app server itself killed.
import { type ChildProcess, spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { sql } from 'kysely';
import { afterAll, describe, expect, it } from 'vitest';
import { getDb, getPool } from '../../src/lib/server/db/client';
import { getCurrentAssumptionSet } from '../../src/lib/server/assessments/assumptions.repository';
import { claimChunk } from '../../src/lib/server/assessments/chunks.repository';
import { sendChunkJobs, stopQueue, sweepRuns } from '../../src/lib/server/assessments/queue';
import { MAX_ATTEMPTS, workNextChunk, workRunHere } from '../../src/lib/server/assessments/run-executor';
import { getRun, insertRun, markFailed, type Run } from '../../src/lib/server/assessments/runs.repository';
import { bigTrust, type BigTrust } from '../helpers/big-trust';
import { api } from '../helpers/session';

const db = getDb();
const pool = getPool();
const children: ChildProcess[] = [];
afterAll(async () => {
  for (const child of children) if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
  await stopQueue();
  // A run left open by these checks is closed, so other tests see no stray running run.
  const open = await db
    .selectFrom('assessment_runs')
    .select('id')
    .where('started_by_email', '=', 'crash-test@test.airtally.test')
    .where('status', 'in', ['queued', 'running'])
    .execute();
  for (const r of open) await markFailed(db, r.id, 'Test over.');
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

/** A run of the whole trust, inserted with its chunks but no queue jobs (so only this test's workers take it). */
async function newRun(trustId: string, chunkSize?: number) {
  const assumptions = await getCurrentAssumptionSet(db, trustId);
  return insertRun(
    db,
    {
      trustId,
      schoolId: null,
      assumptionSetId: assumptions.id,
      assumptionsVersion: assumptions.label,
      startedByUserId: null,
      startedByEmail: 'crash-test@test.airtally.test',
    },
    chunkSize,
  );
}

const countRows = async (runId: string) =>
  (
    await db
      .selectFrom('room_results')
      .select(sql<number>`count(*)::int`.as('n'))
      .where('run_id', '=', runId)
      .executeTakeFirstOrThrow()
  ).n;
const distinctRooms = async (runId: string) =>
  (
    await db
      .selectFrom('room_results')
      .select(sql<number>`count(DISTINCT room_id)::int`.as('n'))
      .where('run_id', '=', runId)
      .executeTakeFirstOrThrow()
  ).n;
/** The runs the trust's views read now (each school points at one). */
const currentRunIds = async (trustId: string) =>
  (await db.selectFrom('assessment_current').select('run_id').distinct().where('trust_id', '=', trustId).execute()).map(
    (r) => r.run_id,
  );
const chunksOf = (runId: string) =>
  db
    .selectFrom('assessment_run_chunks')
    .select(['chunk_no', 'status', 'worker_id', 'attempts', 'rooms'])
    .where('run_id', '=', runId)
    .orderBy('chunk_no')
    .execute();

/** The stored figures of a run by room (everything but the run id). */
async function resultsByRoom(runId: string): Promise<Map<string, Record<string, unknown>>> {
  const rows = await db.selectFrom('room_results').selectAll().where('run_id', '=', runId).execute();
  return new Map(rows.map(({ run_id: _, ...row }) => [row.room_id, row]));
}

/** Starts a worker process and resolves once it is taking jobs, with its worker id. */
async function startWorker(
  args: string[],
  env: Record<string, string>,
  ready: RegExp,
): Promise<{ child: ChildProcess; workerId: string }> {
  // Node itself with tsx's loader (the tsx command would run the worker in a grandchild a kill does not reach).
  const child = spawn(process.execPath, ['--import', 'tsx', ...args], {
    cwd: process.cwd(),
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'inherit'],
  });
  children.push(child);
  const lines = createInterface({ input: child.stdout! });
  const workerId = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error('The worker process did not start within 30 s')), 30_000);
    child.once('exit', (code) => reject(new Error(`The worker process exited (${code}) before it was ready`)));
    lines.on('line', (line) => {
      const match = ready.exec(line);
      if (match) {
        clearTimeout(timer);
        resolve(match[1]!);
      }
    });
  });
  return { child, workerId };
}

/** `npm run worker` (one worker at a time in the process). */
const realWorker = () =>
  startWorker(['scripts/worker.ts'], { ASSESSMENT_WORKER_CONCURRENCY: '1' }, /^Assessment worker (\S+):/);
/** The same worker pausing `pauseMs` before each commit. */
const slowWorker = (pauseMs: number) =>
  startWorker(
    [join('tests', 'integration', 'assessments-crash-worker.ts')],
    { CHUNK_PAUSE_MS: String(pauseMs) },
    /^ready (\S+)$/,
  );

/** Starts a run through the API as the trust's admin (with its queue jobs). */
async function startRun(trust: BigTrust): Promise<string> {
  const response = await api('/api/assessments', {
    method: 'POST',
    cookie: trust.cookie,
    body: JSON.stringify({ scope: 'trust' }),
  });
  expect(response.status).toBe(202);
  return ((await response.json()) as { id: string }).id;
}

const pidOf = (workerId: string | null) => workerId?.split('/')[1];

describe('a run split into chunks across worker processes', () => {
  it('completes on two worker processes with the same results as on one worker', async () => {
    // Enough chunks that both `npm run worker` processes (polling every half second when idle) get some before
    // the app's own workers have taken them all.
    const rooms = 12_000;
    const trust = await bigTrust(db, rooms, 3);
    const one = await newRun(trust.trustId);
    await workRunHere(db, pool, one.id);
    expect((await runOf(one.id)).status).toBe('succeeded');

    const workers = await Promise.all([realWorker(), realWorker()]);
    const id = await startRun(trust);
    const done = await until(() => runOf(id), finished, 60_000, 'The run on several workers did not finish');
    expect(done.status, done.error ?? '').toBe('succeeded');
    const chunks = await chunksOf(id);
    expect(chunks.length).toBeGreaterThan(10);
    expect(chunks.every((c) => c.status === 'done')).toBe(true);
    // Several processes took chunks, the two `npm run worker` processes among them.
    const pids = new Set(chunks.map((c) => pidOf(c.worker_id)));
    expect(pids.size).toBeGreaterThanOrEqual(2);
    expect(workers.some((w) => pids.has(pidOf(w.workerId)))).toBe(true);

    const single = await resultsByRoom(one.id);
    const split = await resultsByRoom(id);
    expect(split.size).toBe(single.size);
    expect(split.size).toBe(rooms - done.problems.length);
    for (const [roomId, row] of single) expect(split.get(roomId), roomId).toEqual(row);
    expect(await currentRunIds(trust.trustId)).toEqual([id]);
    for (const w of workers) w.child.kill('SIGTERM');
  }, 180_000);

  it('loses only the chunk a killed worker held: another worker finishes the run within a minute, no room twice, no mix of runs', async () => {
    // 100 chunks: enough work that the slow worker, polling every half second when idle, gets one before the
    // app's own workers have taken them all (with 20 they could finish the run first on a quiet machine).
    const trust = await bigTrust(db, 12_000, 2);
    const previous = await newRun(trust.trustId);
    await workRunHere(db, pool, previous.id);
    const slow = await slowWorker(4000);
    const id = await startRun(trust);
    // The slow worker holds a chunk (the app's workers take the others meanwhile).
    await until(
      () => chunksOf(id),
      (chunks) => chunks.some((c) => c.status === 'running' && c.worker_id === slow.workerId),
      30_000,
      'The slow worker did not take a chunk',
    );
    // The status counts chunks as they are: done, being worked, waiting; rooms done are the done chunks' rooms.
    // (The status first: chunks only ever get done, so the chunks read after it have at least its rooms done.)
    const status = (await (await api(`/api/assessments/${id}`, { cookie: trust.cookie })).json()) as {
      roomsDone: number;
      chunks: { total: number; done: number; running: number; pending: number };
    };
    const chunks = await chunksOf(id);
    expect(status.chunks.total).toBe(chunks.length);
    expect(status.chunks.running).toBeGreaterThanOrEqual(1);
    expect(status.chunks.done + status.chunks.running + status.chunks.pending).toBe(status.chunks.total);
    const doneRooms = chunks.filter((c) => c.status === 'done').reduce((n, c) => n + c.rooms, 0);
    expect(status.roomsDone).toBeLessThanOrEqual(doneRooms);
    const held = chunks.find((c) => c.status === 'running' && c.worker_id === slow.workerId)!;

    slow.child.kill('SIGKILL');
    const killedAt = Date.now();
    // Until the run finishes, the views read the previous run alone.
    expect(await currentRunIds(trust.trustId)).toEqual([previous.id]);

    const done = await until(() => runOf(id), finished, 60_000, 'The run was not finished after its worker died');
    expect(Date.now() - killedAt).toBeLessThan(60_000);
    expect(done.status, done.error ?? '').toBe('succeeded');
    expect(done.roomsDone).toBe(done.roomsTotal);
    expect(await countRows(id)).toBe(done.roomsTotal - done.problems.length);
    expect(await distinctRooms(id)).toBe(done.roomsTotal - done.problems.length);
    const after = await chunksOf(id);
    const retried = after.find((c) => c.chunk_no === held.chunk_no)!;
    expect(retried.status).toBe('done');
    expect(retried.attempts).toBe(2);
    expect(retried.worker_id).not.toBe(slow.workerId);
    expect(await currentRunIds(trust.trustId)).toEqual([id]);
  }, 180_000);

  it("hands back a chunk whose worker on another machine fell silent, within a minute, and leaves a beating worker's chunk alone", async () => {
    const trust = await bigTrust(db, 600, 2);
    const run = await newRun(trust.trustId, 200);
    expect(run.chunksTotal).toBe(3);
    // As workers elsewhere would leave them: chunk 0 held by a silent worker, chunk 1 by one that keeps beating.
    await db.updateTable('assessment_runs').set({ status: 'running' }).where('id', '=', run.id).execute();
    await sql`UPDATE assessment_run_chunks SET status = 'running', attempts = 1,
      worker_id = CASE chunk_no WHEN 0 THEN 'another-host/4242/dead0000' ELSE 'another-host/4243/alive000' END,
      heartbeat_at = CASE chunk_no WHEN 0 THEN now() - interval '2 minutes' ELSE now() END
      WHERE run_id = ${run.id}::uuid AND chunk_no IN (0, 1)`.execute(db);
    const started = Date.now();
    await sweepRuns(db);
    const swept = await chunksOf(run.id);
    expect(swept[0]!.worker_id).not.toBe('another-host/4242/dead0000');
    expect(swept[1]).toMatchObject({ status: 'running', worker_id: 'another-host/4243/alive000', attempts: 1 });
    // A worker asking for the run's next chunk is never given the beating worker's chunk.
    const claimed = await claimChunk(db, run.id, 'crash-test/1/claims00');
    expect(claimed?.chunkNo).not.toBe(1);
    if (claimed)
      await db
        .updateTable('assessment_run_chunks')
        .set({ status: 'pending', worker_id: null })
        .where('run_id', '=', run.id)
        .where('chunk_no', '=', claimed.chunkNo)
        .execute();
    // The beating worker stops beating too: the sweep hands its chunk back, and the queue's workers finish the run.
    await sql`UPDATE assessment_run_chunks SET heartbeat_at = now() - interval '2 minutes'
      WHERE run_id = ${run.id}::uuid AND chunk_no = 1 AND worker_id = 'another-host/4243/alive000'`.execute(db);
    await sendChunkJobs(db, run.id, 1);
    const done = (
      await until(
        async () => ({ run: await runOf(run.id), chunks: await chunksOf(run.id) }),
        (s) => finished(s.run),
        60_000,
        'The silent chunks were not handed back',
      )
    ).run;
    expect(Date.now() - started).toBeLessThan(60_000);
    expect(done.status, done.error ?? '').toBe('succeeded');
    const after = await chunksOf(run.id);
    expect(after.map((c) => c.status)).toEqual(['done', 'done', 'done']);
    expect(after[1]!.attempts).toBe(2);
    expect(await countRows(run.id)).toBe(done.roomsTotal - done.problems.length);
  }, 120_000);

  it('fails cleanly after a chunk’s last attempt: status failed with the reason, its rows removed, current results kept', async () => {
    const trust = await bigTrust(db, 200, 2);
    const previous = await newRun(trust.trustId);
    await workRunHere(db, pool, previous.id);
    const run = await newRun(trust.trustId, 25);
    // The first chunk commits; the second breaks every time.
    expect(await workNextChunk(db, pool, run.id)).toBe('done');
    const crash = () => {
      throw new Error('simulated worker fault');
    };
    for (let attempt = 1; attempt < MAX_ATTEMPTS; attempt++) {
      expect(await workNextChunk(db, pool, run.id, { beforeCommit: crash })).toBe('retry');
      expect((await runOf(run.id)).status).toBe('running');
    }
    expect(await workNextChunk(db, pool, run.id, { beforeCommit: crash })).toBe('failed');
    const failed = await runOf(run.id);
    expect(failed.status).toBe('failed');
    expect(failed.error).toContain('simulated worker fault');
    expect(failed.finishedAt).not.toBeNull();
    expect(await countRows(run.id)).toBe(0);
    expect(await currentRunIds(trust.trustId)).toEqual([previous.id]);
    // Nobody works a failed run any more.
    expect(await workNextChunk(db, pool, run.id)).toBe('none');
  });
});

describe('the rooms a run assesses', () => {
  it('are the rooms in scope when it started: rooms added later wait for the next run, deleted ones are skipped', async () => {
    const trust = await bigTrust(db, 60, 2);
    const run = await newRun(trust.trustId, 7);
    expect(run.roomsTotal).toBe(60);
    expect(run.chunksTotal).toBe(9);
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
    await workRunHere(db, pool, run.id);
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
  it('is started again, and the run completes within a minute', async () => {
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
    expect(done.roomsDone).toBe(done.roomsTotal);
    expect(await countRows(id)).toBe(done.roomsTotal - done.problems.length);
    expect(await currentRunIds(trust.trustId)).toEqual([id]);
  }, 180_000);
});
