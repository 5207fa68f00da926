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
  roomsTotal: number;
  assumptionSetId: string;
  assumptionsVersion: string;
  startedByUserId: string | null;
  startedByEmail: string | null;
}

/** Inserts a queued run and returns its id. */
export async function insertRun(db: Kysely<Database>, run: NewRun): Promise<string> {
  const { id } = await db
    .insertInto('assessment_runs')
    .values({
      trust_id: run.trustId,
      scope: run.schoolId === null ? 'trust' : 'school',
      school_id: run.schoolId,
      rooms_total: run.roomsTotal,
      assumption_set_id: run.assumptionSetId,
      assumptions_version: run.assumptionsVersion,
      started_by_user_id: run.startedByUserId,
      started_by_email: run.startedByEmail,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return id;
}

/** Records the pg-boss job that works the run. */
export async function setRunJob(db: Kysely<Database>, id: string, jobId: string): Promise<void> {
  await db.updateTable('assessment_runs').set({ job_id: jobId, updated_at: new Date() }).where('id', '=', id).execute();
}

/** Marks a queued (or resumed) run running; returns false when it already finished. */
export async function markRunning(db: Kysely<Database>, id: string): Promise<boolean> {
  const result = await db
    .updateTable('assessment_runs')
    .set({ status: 'running', started_at: sql`COALESCE(started_at, now())`, updated_at: new Date() })
    .where('id', '=', id)
    .where('status', 'in', ['queued', 'running'])
    .executeTakeFirst();
  return Number(result.numUpdatedRows) > 0;
}

/** Marks an unfinished run failed with a message a person can act on. */
export async function markFailed(db: Kysely<Database>, id: string, message: string): Promise<void> {
  await db
    .updateTable('assessment_runs')
    .set({ status: 'failed', error: message, finished_at: new Date(), updated_at: new Date() })
    .where('id', '=', id)
    .where('status', 'in', ['queued', 'running'])
    .execute();
}

/** Notes the error of an attempt that will be retried, without ending the run. */
export async function noteRetry(db: Kysely<Database>, id: string, message: string): Promise<void> {
  await db
    .updateTable('assessment_runs')
    .set({ error: `Retrying after: ${message}`, updated_at: new Date() })
    .where('id', '=', id)
    .where('status', 'in', ['queued', 'running'])
    .execute();
}
