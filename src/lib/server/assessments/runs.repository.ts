import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { RunProblem } from '../../../../db/tables/assessments';

export type RunStatus = 'queued' | 'running' | 'succeeded' | 'failed';

/** An assessment run as the API and pages show it. */
export interface Run {
  id: string;
  trustId: string;
  scope: 'trust' | 'school';
  schoolId: string | null;
  schoolName: string | null;
  status: RunStatus;
  roomsDone: number;
  roomsTotal: number;
  assumptionSetId: string | null;
  assumptionsVersion: string | null;
  startedByEmail: string | null;
  error: string | null;
  problems: RunProblem[];
  jobId: string | null;
  resumeAfterRoomId: string | null;
  /** The worker working it (host/process id/boot nonce) and when it last said it was alive. */
  workerId: string | null;
  heartbeatAt: string | null;
  /** How many times a worker has started or resumed it. */
  attempts: number;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  updatedAt: string;
}

const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString());

function runsQuery(db: Kysely<Database>) {
  return db
    .selectFrom('assessment_runs')
    .leftJoin('schools', 'schools.id', 'assessment_runs.school_id')
    .selectAll('assessment_runs')
    .select('schools.name as school_name');
}

type RunRow = Awaited<ReturnType<ReturnType<typeof runsQuery>['executeTakeFirstOrThrow']>>;

const toRun = (r: RunRow): Run => ({
  id: r.id,
  trustId: r.trust_id,
  scope: r.scope,
  schoolId: r.school_id,
  schoolName: r.school_name,
  status: r.status,
  roomsDone: r.rooms_done,
  roomsTotal: r.rooms_total,
  assumptionSetId: r.assumption_set_id,
  assumptionsVersion: r.assumptions_version,
  startedByEmail: r.started_by_email,
  error: r.error,
  problems: r.problems,
  jobId: r.job_id,
  resumeAfterRoomId: r.resume_after_room_id,
  workerId: r.worker_id,
  heartbeatAt: iso(r.heartbeat_at),
  attempts: r.attempts,
  createdAt: iso(r.created_at)!,
  startedAt: iso(r.started_at),
  finishedAt: iso(r.finished_at),
  updatedAt: iso(r.updated_at)!,
});

/** One run by id; `trustId` null only for the worker, which trusts the job it was given. */
export async function getRun(db: Kysely<Database>, id: string, trustId: string | null): Promise<Run | null> {
  let q = runsQuery(db).where('assessment_runs.id', '=', id);
  if (trustId !== null) q = q.where('assessment_runs.trust_id', '=', trustId);
  const row = await q.executeTakeFirst();
  return row ? toRun(row) : null;
}

/** The trust's most recent runs, newest first. */
export async function listRuns(db: Kysely<Database>, trustId: string, limit: number): Promise<Run[]> {
  const rows = await runsQuery(db)
    .where('assessment_runs.trust_id', '=', trustId)
    .orderBy('assessment_runs.created_at', 'desc')
    .limit(limit)
    .execute();
  return rows.map(toRun);
}

/** A queued or running run of exactly this scope, if any. */
export async function findActiveRun(
  db: Kysely<Database>,
  trustId: string,
  schoolId: string | null,
): Promise<Run | null> {
  let q = runsQuery(db)
    .where('assessment_runs.trust_id', '=', trustId)
    .where('assessment_runs.status', 'in', ['queued', 'running']);
  q =
    schoolId === null
      ? q.where('assessment_runs.scope', '=', 'trust')
      : q.where('assessment_runs.school_id', '=', schoolId);
  const row = await q.orderBy('assessment_runs.created_at', 'desc').executeTakeFirst();
  return row ? toRun(row) : null;
}

export interface NewRun {
  trustId: string;
  schoolId: string | null;
  assumptionSetId: string;
  assumptionsVersion: string;
  startedByUserId: string | null;
  startedByEmail: string | null;
}

/**
 * Inserts a queued run with the rooms it will assess: every room in its scope now, kept in
 * assessment_run_rooms, so rooms added later wait for the next run and a resumed run covers the same set.
 */
export async function insertRun(db: Kysely<Database>, run: NewRun): Promise<{ id: string; roomsTotal: number }> {
  const insert = async (trx: Kysely<Database>) => {
    const { id } = await trx
      .insertInto('assessment_runs')
      .values({
        trust_id: run.trustId,
        scope: run.schoolId === null ? 'trust' : 'school',
        school_id: run.schoolId,
        assumption_set_id: run.assumptionSetId,
        assumptions_version: run.assumptionsVersion,
        started_by_user_id: run.startedByUserId,
        started_by_email: run.startedByEmail,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const inScope = run.schoolId === null ? sql`TRUE` : sql`schools.id = ${run.schoolId}::uuid`;
    const snapshot = await sql`
      INSERT INTO assessment_run_rooms (run_id, room_id)
      SELECT ${id}::uuid, rooms.id FROM rooms JOIN schools ON schools.id = rooms.school_id
      WHERE schools.trust_id = ${run.trustId} AND ${inScope}`.execute(trx);
    const roomsTotal = Number(snapshot.numAffectedRows ?? 0);
    await trx.updateTable('assessment_runs').set({ rooms_total: roomsTotal }).where('id', '=', id).execute();
    return { id, roomsTotal };
  };
  return db.isTransaction ? insert(db) : db.transaction().execute(insert);
}

/**
 * Claims a run for a worker: a queued run, a running one whose worker has gone silent for
 * `deadAfterSeconds`, or one this worker already holds (a retry in the same process). Counts the attempt
 * and starts the heartbeat; returns the attempt number, or null when the run is finished or another
 * worker is working it.
 */
export async function claimRun(
  db: Kysely<Database>,
  id: string,
  workerId: string,
  deadAfterSeconds: number,
): Promise<number | null> {
  const row = await db
    .updateTable('assessment_runs')
    .set({
      status: 'running',
      started_at: sql`COALESCE(started_at, now())`,
      worker_id: workerId,
      heartbeat_at: sql`now()`,
      attempts: sql`attempts + 1`,
      updated_at: new Date(),
    })
    .where('id', '=', id)
    .where((eb) =>
      eb.or([
        eb('status', '=', 'queued'),
        eb.and([eb('status', '=', 'running'), eb('worker_id', '=', workerId)]),
        eb.and([
          eb('status', '=', 'running'),
          eb.or([
            eb('heartbeat_at', 'is', null),
            eb('heartbeat_at', '<', sql<Date>`now() - make_interval(secs => ${deadAfterSeconds})`),
          ]),
        ]),
      ]),
    )
    .returning('attempts')
    .executeTakeFirst();
  return row ? row.attempts : null;
}

/** The worker says it is still working the run; false when the run is no longer its own (or running). */
export async function beat(db: Kysely<Database>, id: string, workerId: string): Promise<boolean> {
  const result = await db
    .updateTable('assessment_runs')
    .set({ heartbeat_at: sql`now()` })
    .where('id', '=', id)
    .where('worker_id', '=', workerId)
    .where('status', '=', 'running')
    .executeTakeFirst();
  return Number(result.numUpdatedRows) > 0;
}

/**
 * Puts a run back in the queue under a new job, to be resumed after its last committed chunk; with
 * `fromWorker`, only while that worker (null: none) still holds it.
 */
export async function requeueRun(
  db: Kysely<Database>,
  id: string,
  jobId: string,
  note: string | null,
  fromWorker?: string | null,
): Promise<void> {
  let q = db
    .updateTable('assessment_runs')
    .set({ status: 'queued', job_id: jobId, worker_id: null, ...(note ? { error: note } : {}), updated_at: new Date() })
    .where('id', '=', id)
    .where('status', 'in', ['queued', 'running']);
  if (fromWorker !== undefined)
    q = fromWorker === null ? q.where('worker_id', 'is', null) : q.where('worker_id', '=', fromWorker);
  await q.execute();
}

/** Running runs and their workers, for the sweep that finds runs whose worker is gone. */
export async function runningRuns(
  db: Kysely<Database>,
  deadAfterSeconds: number,
): Promise<{ id: string; workerId: string | null; silent: boolean }[]> {
  const rows = await db
    .selectFrom('assessment_runs')
    .select([
      'id',
      'worker_id',
      sql<boolean>`heartbeat_at IS NULL OR heartbeat_at < now() - make_interval(secs => ${deadAfterSeconds})`.as(
        'silent',
      ),
    ])
    .where('status', '=', 'running')
    .execute();
  return rows.map((r) => ({ id: r.id, workerId: r.worker_id, silent: r.silent }));
}

/** Queued runs whose job may be gone (nothing has happened to them for `idleSeconds`). */
export async function idleQueuedRuns(
  db: Kysely<Database>,
  idleSeconds: number,
): Promise<{ id: string; jobId: string | null }[]> {
  const rows = await db
    .selectFrom('assessment_runs')
    .select(['id', 'job_id'])
    .where('status', '=', 'queued')
    .where('updated_at', '<', sql<Date>`now() - make_interval(secs => ${idleSeconds})`)
    .execute();
  return rows.map((r) => ({ id: r.id, jobId: r.job_id }));
}

/** Marks an unfinished run failed with a message a person can act on. */
export async function markFailed(db: Kysely<Database>, id: string, message: string): Promise<void> {
  await db
    .updateTable('assessment_runs')
    .set({ status: 'failed', error: message, worker_id: null, finished_at: new Date(), updated_at: new Date() })
    .where('id', '=', id)
    .where('status', 'in', ['queued', 'running'])
    .execute();
}
