import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { findSchool } from '../estate/schools.repository';
import { forbidden, notFound } from '../http/errors';
import { getCurrentAssumptionSet } from './assumptions.repository';
import type { StartRunBody } from './assessments.schemas';
import { chunkCounts, snapshotRoomsInSchools } from './chunks.repository';
import { sendChunkJobs } from './queue';
import { findActiveRun, getRun, insertRun, listRuns, type Run } from './runs.repository';

type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** The run status the API returns. */
export interface RunStatusView {
  id: string;
  scope: 'trust' | 'school';
  schoolId: string | null;
  schoolName: string | null;
  status: Run['status'];
  roomsDone: number;
  roomsTotal: number;
  startedAt: string | null;
  finishedAt: string | null;
  createdAt: string;
  startedByEmail: string | null;
  assumptionsVersion: string | null;
  error?: string;
  problems: Run['problems'];
  /** The chunks the run is split into: committed, being worked now, waiting. */
  chunks: { total: number; done: number; running: number; pending: number };
  /** When the retention rule removed its results (it stays in the history). */
  resultsPrunedAt: string | null;
}

type ChunkCounts = { pending: number; running: number; done: number };

export const toStatusView = (run: Run, counts?: ChunkCounts): RunStatusView => ({
  id: run.id,
  scope: run.scope,
  schoolId: run.schoolId,
  schoolName: run.schoolName,
  status: run.status,
  roomsDone: Math.min(run.roomsDone, run.roomsTotal),
  roomsTotal: run.roomsTotal,
  startedAt: run.startedAt,
  finishedAt: run.finishedAt,
  createdAt: run.createdAt,
  startedByEmail: run.startedByEmail,
  assumptionsVersion: run.assumptionsVersion,
  ...(run.error ? { error: run.error } : {}),
  problems: run.problems,
  // Done, running and pending from one count when there is one, so they add up to the total even while chunks finish.
  chunks: {
    total: run.chunksTotal,
    done: counts?.done ?? run.chunksDone,
    running: counts?.running ?? 0,
    pending: counts?.pending ?? Math.max(0, run.chunksTotal - run.chunksDone),
  },
  resultsPrunedAt: run.resultsPrunedAt,
});

/** The runs as the API shows them, each with how its chunks stand. */
async function statusViews(db: Kysely<Database>, runs: Run[]): Promise<RunStatusView[]> {
  const active = runs.filter((r) => r.status === 'queued' || r.status === 'running').map((r) => r.id);
  const counts = await chunkCounts(db, active);
  return runs.map((r) => toStatusView(r, counts.get(r.id)));
}

/**
 * Queues an assessment of the trust or one school under the trust's current assumption set: the run, its snapshot of
 * rooms split into chunks, one queue job per chunk and the audit event, in one transaction. A run of the same scope
 * that is still queued or running is returned instead of starting a second one.
 */
export async function startRun(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  body: StartRunBody,
): Promise<{ id: string; alreadyRunning: boolean }> {
  const schoolId = body.scope === 'school' ? body.schoolId : null;
  if (schoolId === null && trust.schoolIds !== null)
    throw forbidden('run an assessment of the whole trust (your access is limited to some schools)');
  if (schoolId !== null && !(await findSchool(db, trust, schoolId))) throw notFound('That school');
  const active = await findActiveRun(db, trust.id, schoolId);
  if (active) return { id: active.id, alreadyRunning: true };

  const assumptions = await getCurrentAssumptionSet(db, trust.id);
  const id = await db.transaction().execute(async (trx) => {
    const {
      id: runId,
      roomsTotal,
      chunksTotal,
    } = await insertRun(trx, {
      trustId: trust.id,
      schoolId,
      assumptionSetId: assumptions.id,
      assumptionsVersion: assumptions.label,
      startedByUserId: actor.actorUserId,
      startedByEmail: actor.actorEmail,
    });
    await recordAudit(trx, {
      ...actor,
      trustId: trust.id,
      action: 'assessment.run_started',
      entityType: 'assessment_run',
      entityId: runId,
      summary: `Assessment of ${schoolId ? 'one school' : 'the whole trust'} started (${roomsTotal} rooms, assumptions ${assumptions.label})`,
      after: { scope: body.scope, schoolId, roomsTotal, chunksTotal, assumptionsVersion: assumptions.label },
    });
    await sendChunkJobs(trx, runId, chunksTotal);
    return runId;
  });
  return { id, alreadyRunning: false };
}

/**
 * The runs a member may see. A member limited to some schools sees no run of another school, and of a
 * trust-wide run only the problems of rooms in their schools (the others name other schools' rooms) and the rooms of
 * their schools in its counts (how many rooms the other schools have is not theirs to know).
 */
async function visibleTo(db: Kysely<Database>, trust: ActiveTrust, runs: Run[]): Promise<Run[]> {
  const allowed = trust.schoolIds;
  if (allowed === null) return runs;
  const visible = await withOwnRoomCounts(
    db,
    allowed,
    runs.filter((r) => r.schoolId === null || allowed.includes(r.schoolId)),
  );
  const roomIds = [...new Set(visible.flatMap((r) => r.problems.map((p) => p.roomId)))];
  const inSchools = new Set(
    roomIds.length && allowed.length
      ? (
          await db
            .selectFrom('rooms')
            .select('id')
            .where('id', 'in', roomIds)
            .where('school_id', 'in', allowed)
            .execute()
        ).map((r) => r.id)
      : [],
  );
  return visible.map((r) => ({ ...r, problems: r.problems.filter((p) => inSchools.has(p.roomId)) }));
}

/**
 * Trust-wide runs counted over `schoolIds` only: the run's snapshot rooms in those schools, and its result rows there
 * (the rooms assessed so far). A run whose snapshot was pruned counts its remaining results.
 */
async function withOwnRoomCounts(db: Kysely<Database>, schoolIds: string[], runs: Run[]): Promise<Run[]> {
  const wide = runs.filter((r) => r.schoolId === null).map((r) => r.id);
  if (wide.length === 0) return runs;
  // A member limited to no school at all counts no room.
  const [totals, done] =
    schoolIds.length === 0
      ? [[], []]
      : await Promise.all([
          snapshotRoomsInSchools(db, wide, schoolIds),
          db
            .selectFrom('room_results')
            .select(['run_id', (e) => e.fn.countAll<string>().as('n')])
            .where('run_id', 'in', wide)
            .where('school_id', 'in', schoolIds)
            .groupBy('run_id')
            .execute(),
        ]);
  const totalOf = new Map(totals.map((t) => [t.run_id, Number(t.n)]));
  const doneOf = new Map(done.map((d) => [d.run_id, Number(d.n)]));
  return runs.map((r) => {
    if (r.schoolId !== null) return r;
    const roomsDone = doneOf.get(r.id) ?? 0;
    const roomsTotal = Math.max(totalOf.get(r.id) ?? 0, roomsDone);
    return { ...r, roomsTotal, roomsDone: r.status === 'succeeded' ? roomsTotal : roomsDone };
  });
}

/** A run's status (a run whose worker died is resumed or failed by the queue's sweep within a minute). */
export async function getRunStatus(db: Kysely<Database>, trust: ActiveTrust, id: string): Promise<RunStatusView> {
  const run = await getRun(db, id, trust.id);
  const [visible] = run ? await visibleTo(db, trust, [run]) : [];
  if (!visible) throw notFound('That assessment run');
  const [view] = await statusViews(db, [visible]);
  return view!;
}

/** The trust's recent runs, newest first. */
export async function listRecentRuns(
  db: Kysely<Database>,
  trust: ActiveTrust,
  limit: number,
): Promise<RunStatusView[]> {
  return statusViews(db, await visibleTo(db, trust, await listRuns(db, trust.id, limit)));
}
