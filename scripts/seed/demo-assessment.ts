import type { Kysely } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../db/database';
import { getCurrentAssumptionSet } from '../../src/lib/server/assessments/assumptions.repository';
import { workRunHere } from '../../src/lib/server/assessments/run-executor';
import { getRun, insertRun } from '../../src/lib/server/assessments/runs.repository';
import { DEMO_TRUST } from './demo-trust';

/**
 * Assesses the demo estate once, so a first `npm start` opens on ranked results rather than an empty
 * dashboard. Works its chunks with the same executor the queue's workers use, in this process. Skipped when the demo trust
 * already has a succeeded run.
 */
export async function seedDemoAssessment(db: Kysely<Database>, pool: pg.Pool): Promise<string> {
  const done = await db
    .selectFrom('assessment_runs')
    .select('id')
    .where('trust_id', '=', DEMO_TRUST.id)
    .where('status', '=', 'succeeded')
    .executeTakeFirst();
  if (done) return 'already assessed';
  const assumptions = await getCurrentAssumptionSet(db, DEMO_TRUST.id);
  const { id: runId, roomsTotal } = await insertRun(db, {
    trustId: DEMO_TRUST.id,
    schoolId: null,
    assumptionSetId: assumptions.id,
    assumptionsVersion: assumptions.label,
    startedByUserId: null,
    startedByEmail: null,
  });
  await workRunHere(db, pool, runId);
  const run = await getRun(db, runId, DEMO_TRUST.id);
  return `${run?.status ?? 'unknown'} (${roomsTotal} rooms)`;
}
