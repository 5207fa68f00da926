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

/** SQL for a room's weighted score under `w`, on a table alias with the three score columns (room_results or portfolio_ranks). */
export function weightedScoreSql(w: Weights, alias = 'rr') {
  const n = normaliseWeights(w);
  const t = sql.raw(alias);
  return sql<number>`(${n.risk}::float8 * ${t}.score_risk + ${n.costEffectiveness}::float8 * ${t}.score_cost_effectiveness + ${n.payback}::float8 * ${t}.score_payback)`;
}

/** Order of the ranking: score, then more pupil-hours of poor air, then a stable id. */
export function rankOrderSql(w: Weights, alias = 'rr') {
  const t = sql.raw(alias);
  return sql`${weightedScoreSql(w, alias)} DESC, ${t}.pupil_hours_above DESC, ${t}.room_id ASC`;
}

const sameWeights = (a: Weights, b: Weights) =>
  Math.abs(a.risk - b.risk) < 1e-9 &&
  Math.abs(a.costEffectiveness - b.costEffectiveness) < 1e-9 &&
  Math.abs(a.payback - b.payback) < 1e-9;

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

/** The trust's ranks as built: the weights they use and the results stamp they were built from. */
export interface RankState {
  weights: Weights;
  stamp: string;
}

/**
 * How long a process trusts its last check that a trust's ranks are fresh, ms. A run that finishes in
 * another process shows in the list at most this much later; saving weights here clears it at once.
 */
const FRESH_FOR_MS = 2000;
const checked = new Map<string, { state: RankState; at: number }>();

/** Forgets the freshness check of a trust's ranks (after its weights change). */
export function forgetRankState(trustId: string): void {
  checked.delete(trustId);
}

/**
 * Makes portfolio_ranks match the trust's saved weights and current results, rebuilding it when stale.
 * One round trip when nothing changed, none when checked in the last FRESH_FOR_MS.
 */
export async function ensureRanks(db: Kysely<Database>, trustId: string): Promise<RankState> {
  const recent = checked.get(trustId);
  if (recent && Date.now() - recent.at < FRESH_FOR_MS) return recent.state;
  const state = await checkRanks(db, trustId, { wait: false });
  if (checked.size > 1000) checked.clear();
  checked.set(trustId, { state, at: Date.now() });
  return state;
}

/**
 * Reads the trust's rank state and rebuilds stale ranks. With `wait: false`, a reader that finds another
 * request already rebuilding gets the previous ranks (and their weights) instead of waiting for it.
 */
async function checkRanks(db: Kysely<Database>, trustId: string, options: { wait: boolean }): Promise<RankState> {
  const state = await sql<{
    weight_risk: number | null;
    weight_cost_effectiveness: number | null;
    weight_payback: number | null;
    ranked_weights: Weights | null;
    ranked_stamp: string | null;
    stamp: string;
  }>`
    SELECT ps.weight_risk, ps.weight_cost_effectiveness, ps.weight_payback, ps.ranked_weights, ps.ranked_stamp, ${runsStampSql(trustId)} AS stamp
    FROM (SELECT 1) one LEFT JOIN portfolio_settings ps ON ps.trust_id = ${trustId}`.execute(db);
  const row = state.rows[0]!;
  const weights: Weights =
    row.weight_risk === null || row.weight_cost_effectiveness === null || row.weight_payback === null
      ? { ...DEFAULT_RANK_WEIGHTS }
      : { risk: row.weight_risk, costEffectiveness: row.weight_cost_effectiveness, payback: row.weight_payback };
  if (row.ranked_weights && row.ranked_stamp === row.stamp && sameWeights(row.ranked_weights, weights))
    return { weights, stamp: row.stamp };
  const previous =
    row.ranked_weights && row.ranked_stamp ? { weights: row.ranked_weights, stamp: row.ranked_stamp } : null;
  const stamp = await rebuildRanks(db, trustId, weights, options.wait || previous === null);
  if (stamp === null) return previous!;
  return { weights, stamp };
}

/**
 * Rebuilds the trust's ranks under `weights` in one transaction (readers see the old ranks until it commits).
 * One rebuild per trust at a time: with `wait` the caller queues behind a running one, without it the
 * caller gets null at once.
 */
async function rebuildRanks(
  db: Kysely<Database>,
  trustId: string,
  weights: Weights,
  wait: boolean,
): Promise<string | null> {
  return db.transaction().execute(async (trx) => {
    const lockKey = `portfolio_ranks:${trustId}`;
    if (wait) {
      await sql`SELECT pg_advisory_xact_lock(hashtext(${lockKey}))`.execute(trx);
    } else {
      const got = await sql<{ ok: boolean }>`SELECT pg_try_advisory_xact_lock(hashtext(${lockKey})) AS ok`.execute(trx);
      if (!got.rows[0]?.ok) return null;
    }
    const stampRow = await trx.selectNoFrom(runsStampSql(trustId).as('stamp')).executeTakeFirstOrThrow();
    const current = await trx
      .selectFrom('portfolio_settings')
      .select(['ranked_weights', 'ranked_stamp'])
      .where('trust_id', '=', trustId)
      .executeTakeFirst();
    if (
      current?.ranked_stamp === stampRow.stamp &&
      current.ranked_weights &&
      sameWeights(current.ranked_weights as Weights, weights)
    )
      return stampRow.stamp;
    await trx.deleteFrom('portfolio_ranks').where('trust_id', '=', trustId).execute();
    await sql`
      INSERT INTO portfolio_ranks (trust_id, room_id, school_id, rank, score, block_id, school_name, ventilation_type, risk_band,
        criteria_met, pupils, mean_co2_ppm, peak_co2_ppm, unit_count, capital_cost_gbp, simple_payback_years, npv_gbp,
        pupil_hours_above, score_risk, score_cost_effectiveness, score_payback)
      SELECT rr.trust_id, rr.room_id, rr.school_id, row_number() OVER (ORDER BY ${rankOrderSql(weights)}), ${weightedScoreSql(weights)},
        rr.block_id, s.name, rr.ventilation_type, rr.risk_band, rr.criteria_met, rr.pupils, rr.mean_co2_ppm, rr.peak_co2_ppm,
        rr.unit_count, rr.capital_cost_gbp, rr.simple_payback_years, rr.npv_gbp, rr.pupil_hours_above, rr.score_risk,
        rr.score_cost_effectiveness, rr.score_payback
      FROM room_results rr JOIN schools s ON s.id = rr.school_id
      WHERE rr.trust_id = ${trustId} AND rr.is_current`.execute(trx);
    await sql`ANALYZE portfolio_ranks`.execute(trx);
    await trx
      .insertInto('portfolio_settings')
      .values({
        trust_id: trustId,
        ranked_weights: JSON.stringify(weights),
        ranked_stamp: stampRow.stamp,
        ranked_at: new Date(),
      })
      .onConflict((oc) =>
        oc.column('trust_id').doUpdateSet({
          ranked_weights: JSON.stringify(weights),
          ranked_stamp: stampRow.stamp,
          ranked_at: new Date(),
        }),
      )
      .execute();
    return stampRow.stamp;
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
  forgetRankState(trustId);
  // The person who saved sees the list in their new order: wait for any rebuild already running.
  await checkRanks(db, trustId, { wait: true });
  return getWeightSettings(db, trustId);
}
