/**
 * How long a trust keeps its runs' results. The trust admin sets how many of the latest succeeded runs keep theirs;
 * older runs' result rows, room snapshots and input snapshots are removed (the run stays in the history, marked),
 * except a run whose results are still current for some school and a run a saved capital programme was planned
 * from (its board report and bid packs cite it).
 */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';

/** Runs whose results are kept when the trust admin has not chosen. */
export const DEFAULT_KEEP_RUNS = 10;

/** The trust's retention rule as the settings show it. */
export interface RetentionSettings {
  keepRuns: number;
  isDefault: boolean;
  updatedAt: string | null;
  updatedByEmail: string | null;
}

/** The trust's retention rule (the default until the trust admin saves one). */
export async function getRetention(db: Kysely<Database>, trustId: string): Promise<RetentionSettings> {
  const row = await db.selectFrom('assessment_settings').selectAll().where('trust_id', '=', trustId).executeTakeFirst();
  if (!row) return { keepRuns: DEFAULT_KEEP_RUNS, isDefault: true, updatedAt: null, updatedByEmail: null };
  return {
    keepRuns: row.keep_runs,
    isDefault: false,
    updatedAt: new Date(row.updated_at).toISOString(),
    updatedByEmail: row.updated_by_email,
  };
}

/** Saves the trust's rule (audited in the same transaction) and prunes by it at once. */
export async function saveRetention(
  db: Kysely<Database>,
  trustId: string,
  keepRuns: number,
  actor: Pick<AuditEntry, 'actorUserId' | 'actorEmail'>,
): Promise<{ settings: RetentionSettings; prunedRuns: number }> {
  const before = await getRetention(db, trustId);
  await db.transaction().execute(async (trx) => {
    const values = { keep_runs: keepRuns, updated_at: new Date(), updated_by_email: actor.actorEmail };
    await trx
      .insertInto('assessment_settings')
      .values({ trust_id: trustId, ...values })
      .onConflict((oc) => oc.column('trust_id').doUpdateSet(values))
      .execute();
    await recordAudit(trx, {
      trustId,
      ...actor,
      action: 'assessment.retention_set',
      entityType: 'assessment_settings',
      entityId: trustId,
      summary: `Assessment results kept for the latest ${keepRuns} succeeded runs (and any run a programme was planned from)`,
      before: { keepRuns: before.keepRuns },
      after: { keepRuns },
    });
  });
  const prunedRuns = await pruneRuns(db, trustId);
  return { settings: await getRetention(db, trustId), prunedRuns };
}

/**
 * Removes the results of the trust's runs beyond its rule, in one transaction with its audit event; returns how many
 * runs lost their results. Kept: the latest `keepRuns` succeeded runs, every run whose results are current for some
 * school, every run a saved programme was planned from, and runs not finished yet.
 */
export async function pruneRuns(db: Kysely<Database>, trustId: string): Promise<number> {
  const { keepRuns } = await getRetention(db, trustId);
  return db.transaction().execute(async (trx) => {
    // One prune per trust at a time (two runs finishing together).
    await sql`SELECT pg_advisory_xact_lock(hashtext(${`assessment-prune:${trustId}`}))`.execute(trx);
    const { rows } = await sql<{ id: string; finished_at: Date | null; status: string }>`
      WITH latest AS (
        SELECT id FROM assessment_runs
        WHERE trust_id = ${trustId} AND status = 'succeeded' AND results_pruned_at IS NULL
        ORDER BY finished_at DESC, id DESC LIMIT ${keepRuns}
      ), cited AS (
        SELECT run_id AS id FROM assessment_current WHERE trust_id = ${trustId}
        UNION
        SELECT (r->>'runId')::uuid FROM programmes p, jsonb_array_elements(p.source->'runs') r
        WHERE p.trust_id = ${trustId} AND r->>'runId' IS NOT NULL
      )
      SELECT id, finished_at, status FROM assessment_runs
      WHERE trust_id = ${trustId} AND status IN ('succeeded', 'failed') AND results_pruned_at IS NULL
        AND id NOT IN (SELECT id FROM latest) AND id NOT IN (SELECT id FROM cited)
      ORDER BY finished_at`.execute(trx);
    if (rows.length === 0) return 0;
    const ids = rows.map((r) => r.id);
    const ofRuns = sql<boolean>`run_id = ANY(${ids}::uuid[])`;
    await trx.deleteFrom('room_results').where(ofRuns).execute();
    await trx.deleteFrom('run_school_summaries').where(ofRuns).execute();
    await trx.deleteFrom('assessment_run_chunks').where(ofRuns).execute();
    await trx
      .updateTable('assessment_runs')
      .set({ results_pruned_at: new Date(), updated_at: new Date() })
      .where('id', 'in', ids)
      .execute();
    await recordAudit(trx, {
      trustId,
      actorUserId: null,
      actorEmail: null,
      action: 'assessment.runs_pruned',
      entityType: 'assessment_run',
      entityId: null,
      summary: `Results of ${ids.length} older ${ids.length === 1 ? 'run' : 'runs'} removed (the trust keeps the latest ${keepRuns})`,
      after: { runIds: ids, keepRuns },
    });
    return ids.length;
  });
}
