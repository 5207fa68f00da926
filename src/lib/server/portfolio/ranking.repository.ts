/**
 * The trust's ranking: saved weights and the ranks they give. Ranks are the weighted sum of the three
 * component scores the engine stored per room (0–1, higher = do sooner), computed in SQL and kept in
 * portfolio_ranks; they are rebuilt when the weights or the trust's succeeded runs change.
 */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { DEFAULT_RANK_WEIGHTS } from '../../engine/ranking';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { Weights } from './portfolio.schemas';
import type { WeightSettings } from './portfolio.types';

/** Weights scaled to sum to 1, so scores stay in 0–1 whatever the sliders say. */
export function normaliseWeights(w: Weights): Weights {
  const sum = w.risk + w.costEffectiveness + w.payback;
  return { risk: w.risk / sum, costEffectiveness: w.costEffectiveness / sum, payback: w.payback / sum };
}

/** SQL for a room's weighted score under `w` (alias `rr` = room_results). */
export function weightedScoreSql(w: Weights) {
  const n = normaliseWeights(w);
  return sql<number>`(${n.risk}::float8 * rr.score_risk + ${n.costEffectiveness}::float8 * rr.score_cost_effectiveness + ${n.payback}::float8 * rr.score_payback)`;
}

/** Order of the ranking: score, then more pupil-hours of poor air, then a stable id. */
export function rankOrderSql(w: Weights) {
  return sql`${weightedScoreSql(w)} DESC, rr.pupil_hours_above DESC, rr.room_id ASC`;
}

const sameWeights = (a: Weights, b: Weights) =>
  Math.abs(a.risk - b.risk) < 1e-9 && Math.abs(a.costEffectiveness - b.costEffectiveness) < 1e-9 && Math.abs(a.payback - b.payback) < 1e-9;

/** The trust's saved weights, or the engine's defaults when none are saved. */
export async function getWeightSettings(db: Kysely<Database>, trustId: string): Promise<WeightSettings> {
  const row = await db.selectFrom('portfolio_settings').selectAll().where('trust_id', '=', trustId).executeTakeFirst();
  if (!row || row.weight_risk === null || row.weight_cost_effectiveness === null || row.weight_payback === null) {
    return { weights: { ...DEFAULT_RANK_WEIGHTS }, isDefault: true, savedAt: null, savedByEmail: null };
  }
  return {
    weights: { risk: row.weight_risk, costEffectiveness: row.weight_cost_effectiveness, payback: row.weight_payback },
    isDefault: false,
    savedAt: row.weights_saved_at ? new Date(row.weights_saved_at).toISOString() : null,
    savedByEmail: row.weights_saved_by_email,
  };
}

/** A stamp that changes whenever a run of the trust succeeds (and so the current results change). */
function runsStampSql(trustId: string) {
  return sql<string>`(SELECT coalesce(max(finished_at)::text, '') || ':' || count(*) FROM assessment_runs WHERE trust_id = ${trustId} AND status = 'succeeded')`;
}

/**
 * Makes portfolio_ranks match the trust's saved weights and current results, rebuilding it when stale.
 * Returns the weights the ranks use.
 */
export async function ensureRanks(db: Kysely<Database>, trustId: string): Promise<Weights> {
  const state = await db
    .selectNoFrom((eb) => [
      eb.selectFrom('portfolio_settings').select('ranked_weights').where('trust_id', '=', trustId).as('ranked_weights'),
      eb.selectFrom('portfolio_settings').select('ranked_stamp').where('trust_id', '=', trustId).as('ranked_stamp'),
      runsStampSql(trustId).as('stamp'),
    ])
    .executeTakeFirstOrThrow();
  const { weights } = await getWeightSettings(db, trustId);
  const ranked = state.ranked_weights as Weights | null;
  if (ranked && state.ranked_stamp === state.stamp && sameWeights(ranked, weights)) return weights;
  await rebuildRanks(db, trustId, weights);
  return weights;
}

/** Rebuilds the trust's ranks under `weights` in one transaction; concurrent rebuilds wait for each other. */
async function rebuildRanks(db: Kysely<Database>, trustId: string, weights: Weights): Promise<void> {
  await db.transaction().execute(async (trx) => {
    await sql`SELECT pg_advisory_xact_lock(hashtext(${`portfolio_ranks:${trustId}`}))`.execute(trx);
    const stampRow = await trx.selectNoFrom(runsStampSql(trustId).as('stamp')).executeTakeFirstOrThrow();
    const current = await trx.selectFrom('portfolio_settings').select(['ranked_weights', 'ranked_stamp']).where('trust_id', '=', trustId).executeTakeFirst();
    if (current?.ranked_stamp === stampRow.stamp && current.ranked_weights && sameWeights(current.ranked_weights as Weights, weights)) return;
    await trx.deleteFrom('portfolio_ranks').where('trust_id', '=', trustId).execute();
    await sql`
      INSERT INTO portfolio_ranks (trust_id, room_id, school_id, rank, score)
      SELECT rr.trust_id, rr.room_id, rr.school_id, row_number() OVER (ORDER BY ${rankOrderSql(weights)}), ${weightedScoreSql(weights)}
      FROM room_results rr
      WHERE rr.trust_id = ${trustId} AND rr.is_current`.execute(trx);
    await trx
      .insertInto('portfolio_settings')
      .values({ trust_id: trustId, ranked_weights: JSON.stringify(weights), ranked_stamp: stampRow.stamp, ranked_at: new Date() })
      .onConflict((oc) =>
        oc.column('trust_id').doUpdateSet({ ranked_weights: JSON.stringify(weights), ranked_stamp: stampRow.stamp, ranked_at: new Date() }),
      )
      .execute();
  });
}

/** Saves the trust's weights (audited) and re-ranks with them. */
export async function saveWeights(
  db: Kysely<Database>,
  trustId: string,
  weights: Weights,
  actor: Pick<AuditEntry, 'actorUserId' | 'actorEmail'>,
): Promise<WeightSettings> {
  const before = await getWeightSettings(db, trustId);
  await db.transaction().execute(async (trx) => {
    const values = {
      weight_risk: weights.risk,
      weight_cost_effectiveness: weights.costEffectiveness,
      weight_payback: weights.payback,
      weights_saved_at: new Date(),
      weights_saved_by_email: actor.actorEmail,
    };
    await trx
      .insertInto('portfolio_settings')
      .values({ trust_id: trustId, ...values })
      .onConflict((oc) => oc.column('trust_id').doUpdateSet(values))
      .execute();
    await recordAudit(trx, {
      trustId,
      ...actor,
      action: 'portfolio.weights.save',
      entityType: 'portfolio_settings',
      entityId: trustId,
      summary: `Ranking weights set to risk ${weights.risk}, cost-effectiveness ${weights.costEffectiveness}, payback ${weights.payback}`,
      before: before.weights,
      after: weights,
    });
  });
  await ensureRanks(db, trustId);
  return getWeightSettings(db, trustId);
}
