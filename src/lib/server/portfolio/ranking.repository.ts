/**
 * The trust's ranking: saved weights and the ranks they give. Every rank anywhere (priorities, room page,
 * dashboard, every export) comes from portfolio_ranks, which is built by the engine's one ranking rule
 * (rankOrder in src/lib/engine/ranking.ts) over the stored parts of the trust's current results; it is rebuilt
 * when the weights or the trust's succeeded runs change. Previews of other weights use the same rule.
 */
import { sql, type Kysely } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import { DEFAULT_RANK_WEIGHTS, type RankParts, type RankPlace, rankOrder } from '../../engine/ranking';
import { poolOf, withConnection } from '../db/client';
import { binaryCopy, copyLines, readBinaryCopy } from '../db/copy';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { Weights } from './portfolio.schemas';
import type { WeightSettings } from './portfolio.types';

/** The stored parts that decide a room's rank (columns of its current result row), with the run of that row. */
export async function loadRankParts(db: Kysely<Database>, trustId: string): Promise<(RankParts & { runId: string })[]> {
  const { rows } = await sql<{
    room_id: string;
    run_id: string;
    r: number;
    h: number;
    ce: number | null;
    pb: number | null;
  }>`
    SELECT room_id, run_id, risk_score AS r, pupil_hours_above AS h, pupil_hours_removed_per_1000_gbp AS ce,
      simple_payback_years AS pb
    FROM current_room_results WHERE trust_id = ${trustId}`.execute(db);
  return rows.map((row) => ({
    roomId: row.room_id,
    runId: row.run_id,
    riskScore: row.r,
    pupilHoursPerYearAbove: row.h,
    pupilHoursRemovedPer1000Gbp: row.ce,
    simplePaybackYears: row.pb,
  }));
}

/** The engine's ranking of the trust's current results under `weights`, as column arrays for SQL. */
export async function computeRanks(
  db: Kysely<Database>,
  trustId: string,
  weights: Weights,
): Promise<{
  ids: string[];
  runs: string[];
  ranks: number[];
  scores: number[];
  risk: number[];
  ce: number[];
  pb: number[];
}> {
  const ranked = rankOrder(await loadRankParts(db, trustId), weights);
  return {
    ids: ranked.map((r) => r.row.roomId),
    runs: ranked.map((r) => r.row.runId),
    ranks: ranked.map((r) => r.rank),
    scores: ranked.map((r) => r.score),
    risk: ranked.map((r) => r.parts.risk),
    ce: ranked.map((r) => r.parts.costEffectiveness),
    pb: ranked.map((r) => r.parts.payback),
  };
}

const previewCache = new Map<string, { ids: string[]; ranks: number[]; scores: number[] }>();

/** Ranks under preview weights (not saved), by the same rule; cached per trust, results stamp and weights. */
export async function previewRanks(
  db: Kysely<Database>,
  trustId: string,
  stamp: string,
  weights: Weights,
): Promise<{ ids: string[]; ranks: number[]; scores: number[] }> {
  const key = JSON.stringify([trustId, stamp, weights]);
  const hit = previewCache.get(key);
  if (hit) return hit;
  const computed = await computeRanks(db, trustId, weights);
  if (previewCache.size > 20) previewCache.clear();
  previewCache.set(key, computed);
  return computed;
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

/**
 * The trust's ranks as built: the weights they use, the results stamp they were built from, and their generation (the
 * portfolio_ranks rows readers take).
 */
export interface RankState {
  weights: Weights;
  stamp: string;
  generation: number;
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
 * Rebuilds the trust's ranks now if they are stale, waiting for a rebuild already running (the worker that finishes a
 * run calls it, so the first page read after the run does not wait for the ranking).
 */
export async function refreshRanks(db: Kysely<Database>, trustId: string): Promise<RankState> {
  forgetRankState(trustId);
  return checkRanks(db, trustId, { wait: true });
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
    ranked_generation: number | null;
    stamp: string;
  }>`
    SELECT ps.weight_risk, ps.weight_cost_effectiveness, ps.weight_payback, ps.ranked_weights, ps.ranked_stamp,
      ps.ranked_generation, ${runsStampSql(trustId)} AS stamp
    FROM (SELECT 1) one LEFT JOIN portfolio_settings ps ON ps.trust_id = ${trustId}`.execute(db);
  const row = state.rows[0]!;
  const weights: Weights =
    row.weight_risk === null || row.weight_cost_effectiveness === null || row.weight_payback === null
      ? { ...DEFAULT_RANK_WEIGHTS }
      : { risk: row.weight_risk, costEffectiveness: row.weight_cost_effectiveness, payback: row.weight_payback };
  const built = row.ranked_generation !== null && row.ranked_weights !== null && row.ranked_stamp !== null;
  if (built && row.ranked_stamp === row.stamp && sameWeights(row.ranked_weights!, weights))
    return { weights, stamp: row.stamp, generation: row.ranked_generation! };
  const previous = built
    ? { weights: row.ranked_weights!, stamp: row.ranked_stamp!, generation: row.ranked_generation! }
    : null;
  const rebuilt = await rebuildRanks(db, trustId, weights, options.wait || previous === null);
  return rebuilt ?? previous!;
}

/** Pieces a rebuild writes its rows in at once, each on its own connection. */
const REBUILD_PIECES = 2;

/** A current result as the rank rule needs it, and where its other columns are in the trust's RankSources. */
interface RankSource extends RankParts {
  at: number;
}

/** The numbers of a result a rank row copies, in this order in RankSources.numbers (NaN for null). */
const NUMBERS = [
  'risk_band',
  'criteria_met',
  'pupils',
  'mean_co2_ppm',
  'peak_co2_ppm',
  'unit_count',
  'capital_cost_gbp',
  'npv_gbp',
  'pupil_hours_removed',
] as const;
const NUMBER_COUNT = NUMBERS.length;
/** Per result, the run's, the school's and the block's ids: 16 bytes each. */
const ID_BYTES = 48;

/**
 * The trust's current results as a rebuild needs them. The rank rule gets one small object per result (its parts and
 * id); the filter and sort keys the rank rows copy stay by column (ids as bytes, numbers in one array, names shared
 * between the rows of a school), so hundreds of thousands of results leave few objects for the garbage collector.
 */
interface RankSources {
  rows: RankSource[];
  ids: Uint8Array;
  hasBlock: Uint8Array;
  schoolNames: string[];
  ventilationTypes: string[];
  numbers: Float64Array;
}

/** A typed array with room for `length` items, keeping `from`'s. */
function grown<A extends Uint8Array | Float64Array>(from: A, length: number): A {
  const to = new (from.constructor as new (n: number) => A)(length);
  to.set(from);
  return to;
}

/**
 * The trust's current results as rank rows need them: one read, by binary COPY on `client`. At 550,000 rooms, reading
 * them as rows of text took about 7 s here, most of it parsing and collecting garbage. The casts fix each column's
 * type for the decoder.
 */
async function loadRankSources(client: pg.PoolClient, trustId: string): Promise<RankSources> {
  const copySql = `COPY (
    SELECT rr.room_id, rr.risk_score::float8, rr.pupil_hours_above::float8,
      rr.pupil_hours_removed_per_1000_gbp::float8, rr.simple_payback_years::float8,
      rr.run_id, rr.school_id, rr.block_id, s.name::text, rr.ventilation_type::text,
      rr.risk_band::float8, rr.criteria_met::int::float8, rr.pupils::float8, rr.mean_co2_ppm::float8,
      rr.peak_co2_ppm::float8, rr.unit_count::float8, rr.capital_cost_gbp::float8, rr.npv_gbp::float8,
      rr.pupil_hours_removed::float8
    FROM current_room_results rr JOIN schools s ON s.id = rr.school_id
    WHERE rr.trust_id = ${client.escapeLiteral(trustId)}) TO STDOUT (FORMAT binary)`;
  const types = [
    'uuid',
    'float8',
    'float8',
    'float8',
    'float8',
    'uuid-bytes',
    'uuid-bytes',
    'uuid-bytes',
    'text',
    'text',
    ...NUMBERS.map(() => 'float8' as const),
  ] as const;
  const sources: RankSources = {
    rows: [],
    ids: new Uint8Array(ID_BYTES * 1024),
    hasBlock: new Uint8Array(1024),
    schoolNames: [],
    ventilationTypes: [],
    numbers: new Float64Array(NUMBER_COUNT * 1024),
  };
  const names = new Map<string, string>();
  /** One string per distinct name (a school's rows share theirs). */
  const shared = (text: string) => {
    const known = names.get(text);
    if (known !== undefined) return known;
    names.set(text, text);
    return text;
  };
  for await (const batch of readBinaryCopy(client, copySql, types)) {
    for (const v of batch) {
      const at = sources.rows.length;
      if (at === sources.hasBlock.length) {
        sources.ids = grown(sources.ids, 2 * at * ID_BYTES);
        sources.hasBlock = grown(sources.hasBlock, 2 * at);
        sources.numbers = grown(sources.numbers, 2 * at * NUMBER_COUNT);
      }
      sources.rows.push({
        at,
        roomId: v[0] as string,
        riskScore: v[1] as number,
        pupilHoursPerYearAbove: v[2] as number,
        pupilHoursRemovedPer1000Gbp: v[3] as number | null,
        simplePaybackYears: v[4] as number | null,
      });
      sources.ids.set(v[5] as Uint8Array, at * ID_BYTES);
      sources.ids.set(v[6] as Uint8Array, at * ID_BYTES + 16);
      if (v[7] !== null) {
        sources.ids.set(v[7] as Uint8Array, at * ID_BYTES + 32);
        sources.hasBlock[at] = 1;
      }
      sources.schoolNames.push(shared(v[8] as string));
      sources.ventilationTypes.push(shared(v[9] as string));
      for (let k = 0; k < NUMBER_COUNT; k += 1)
        sources.numbers[at * NUMBER_COUNT + k] = (v[10 + k] as number | null) ?? Number.NaN;
    }
  }
  return sources;
}

/** portfolio_ranks' columns as a rebuild of `generation` writes them, with their binary COPY types and values. */
function rankCopy(trustId: string, generation: number, sources: RankSources) {
  const { ids, hasBlock, schoolNames, ventilationTypes, numbers } = sources;
  /** The run's (0), school's (1) or block's (2) id of a place's result, as bytes. */
  const id = (p: RankPlace<RankSource>, which: number) => {
    const from = p.row.at * ID_BYTES + which * 16;
    return ids.subarray(from, from + 16);
  };
  /** The value of one of NUMBERS for a place's result (NaN, written as NULL, for null). */
  const numberOf = (name: (typeof NUMBERS)[number]) => {
    const k = NUMBERS.indexOf(name);
    return (p: RankPlace<RankSource>) => numbers[p.row.at * NUMBER_COUNT + k];
  };
  const criteriaMet = NUMBERS.indexOf('criteria_met');
  return binaryCopy<RankPlace<RankSource>>([
    ['trust_id', 'text', () => trustId],
    ['generation', 'int8', () => generation],
    ['room_id', 'uuid', (p) => p.row.roomId],
    ['school_id', 'uuid', (p) => id(p, 1)],
    ['run_id', 'uuid', (p) => id(p, 0)],
    ['rank', 'int4', (p) => p.rank],
    ['score', 'float8', (p) => p.score],
    ['block_id', 'uuid', (p) => (hasBlock[p.row.at] ? id(p, 2) : null)],
    ['school_name', 'text', (p) => schoolNames[p.row.at]],
    ['ventilation_type', 'text', (p) => ventilationTypes[p.row.at]],
    ['risk_band', 'int2', numberOf('risk_band')],
    [
      'criteria_met',
      'bool',
      (p) => {
        const met = numbers[p.row.at * NUMBER_COUNT + criteriaMet]!;
        return Number.isNaN(met) ? null : met === 1;
      },
    ],
    ['pupils', 'int4', numberOf('pupils')],
    ['mean_co2_ppm', 'float8', numberOf('mean_co2_ppm')],
    ['peak_co2_ppm', 'float8', numberOf('peak_co2_ppm')],
    ['unit_count', 'int4', numberOf('unit_count')],
    ['capital_cost_gbp', 'float8', numberOf('capital_cost_gbp')],
    ['simple_payback_years', 'float8', (p) => p.row.simplePaybackYears],
    ['npv_gbp', 'float8', numberOf('npv_gbp')],
    ['pupil_hours_above', 'float8', (p) => p.row.pupilHoursPerYearAbove],
    ['pupil_hours_removed', 'float8', numberOf('pupil_hours_removed')],
    ['score_risk', 'float8', (p) => p.parts.risk],
    ['score_cost_effectiveness', 'float8', (p) => p.parts.costEffectiveness],
    ['score_payback', 'float8', (p) => p.parts.payback],
  ]);
}

/** Writes ranked rooms as rows of `generation`, with their filter and sort keys, by binary COPY on `client`. */
async function copyRankRows(
  client: pg.PoolClient,
  trustId: string,
  generation: number,
  sources: RankSources,
  places: readonly RankPlace<RankSource>[],
): Promise<void> {
  const copy = rankCopy(trustId, generation, sources);
  await copyLines(client, copy.sql('portfolio_ranks'), copy.pieces(places));
}

/** The same on a connection of its own, committed at once (rows of a generation nobody reads yet). */
async function copyRankRowsApart(
  pool: pg.Pool,
  trustId: string,
  generation: number,
  sources: RankSources,
  places: readonly RankPlace<RankSource>[],
): Promise<void> {
  await withConnection(pool, async (_, client) => {
    await client.query('BEGIN');
    await copyRankRows(client, trustId, generation, sources, places);
    await client.query('COMMIT');
  });
}

/**
 * Rebuilds the trust's ranks under `weights` as a new generation and switches readers to it in one small update
 * (readers keep the generation they have until then). The rows are written in pieces at once, one in the rebuild's
 * own transaction and the others on connections of their own (rows of a generation nobody reads yet; a rebuild that
 * fails leaves rows the next one removes). The generation before stays for readers still on it, until the next
 * rebuild; older ones are deleted once the new generation is committed, so readers see it without waiting for the
 * delete. One rebuild per trust at a time: with `wait` the caller queues behind a running one, without it the caller
 * gets null at once.
 */
async function rebuildRanks(
  db: Kysely<Database>,
  trustId: string,
  weights: Weights,
  wait: boolean,
): Promise<RankState | null> {
  const pool = poolOf(db);
  // A connection of the pool's own (not Kysely's transaction), so the rebuild's piece goes by COPY in its transaction.
  // A failure discards the connection, and with it the transaction.
  const rebuilt = await withConnection(pool, async (trx, client) => {
    await client.query('BEGIN');
    const result = await rebuildIn(trx, client, pool, trustId, weights, wait);
    await client.query('COMMIT');
    return result;
  });
  if (rebuilt?.before !== undefined) await deleteOldGenerations(db, trustId, rebuilt.state.generation, rebuilt.before);
  return rebuilt?.state ?? null;
}

/**
 * Deletes the trust's rank rows older than generation `current`, but for `before` (the generation readers were on until
 * now): the generation before the last, and any a failed rebuild left. The trust's generations are its builds
 * (portfolio_rank_builds), each deleted with its rows in one statement. Generations come from a sequence taken under
 * the rebuild's lock, so a rebuild that starts after this one's commit writes only newer rows, which stay. A failure
 * here is logged: the ranks are already switched, and the next rebuild deletes what is left.
 */
async function deleteOldGenerations(
  db: Kysely<Database>,
  trustId: string,
  current: number,
  before: number | null,
): Promise<void> {
  try {
    await sql`
      WITH old AS (
        DELETE FROM portfolio_rank_builds
        WHERE trust_id = ${trustId} AND generation < ${current} AND generation <> ${before ?? -1}
        RETURNING generation)
      DELETE FROM portfolio_ranks WHERE generation IN (SELECT generation FROM old)`.execute(db);
  } catch (error) {
    console.error(`Deleting the old rank generations of trust ${trustId} failed`, error);
  }
}

/** A rebuild slower than this is logged with the time of each step (550,000 rooms take about 15-20 s here). */
const SLOW_REBUILD_MS = 30_000;

/** Times the steps of a rebuild; reportIfSlow logs them when their sum passes SLOW_REBUILD_MS. */
function stepLog() {
  const steps: string[] = [];
  const started = performance.now();
  let last = started;
  const step = (name: string) => {
    const now = performance.now();
    steps.push(`${name} ${((now - last) / 1000).toFixed(1)} s`);
    last = now;
  };
  step.reportIfSlow = (what: string) => {
    const totalMs = last - started;
    if (totalMs > SLOW_REBUILD_MS) console.warn(`${what} took ${(totalMs / 1000).toFixed(1)} s: ${steps.join(', ')}`);
  };
  return step;
}

/** rebuildRanks inside its transaction (`trx` and `client` are the same connection). */
async function rebuildIn(
  trx: Kysely<Database>,
  client: pg.PoolClient,
  pool: pg.Pool,
  trustId: string,
  weights: Weights,
  wait: boolean,
): Promise<{ state: RankState; before?: number | null } | null> {
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
    .select(['ranked_weights', 'ranked_stamp', 'ranked_generation'])
    .where('trust_id', '=', trustId)
    .executeTakeFirst();
  if (
    current?.ranked_generation != null &&
    current.ranked_stamp === stampRow.stamp &&
    current.ranked_weights &&
    sameWeights(current.ranked_weights as Weights, weights)
  )
    return { state: { weights, stamp: stampRow.stamp, generation: current.ranked_generation } };
  // The build is recorded and committed before any of its rows are written, so that the rows of a rebuild that fails
  // are found (and deleted) by the next one, and by the triggers of a deleted room, school or trust meanwhile.
  const generation = Number(
    (
      await pool.query<{ generation: string }>(
        'INSERT INTO portfolio_rank_builds (trust_id) VALUES ($1) RETURNING generation',
        [trustId],
      )
    ).rows[0]!.generation,
  );
  const step = stepLog();
  const sources = await loadRankSources(client, trustId);
  step('read the results');
  const places = rankOrder(sources.rows, weights);
  step('order');
  const size = Math.ceil(places.length / REBUILD_PIECES);
  await Promise.all(
    Array.from({ length: REBUILD_PIECES }, (_, piece) => {
      const part = places.slice(piece * size, (piece + 1) * size);
      if (part.length === 0) return Promise.resolve();
      return piece === 0
        ? copyRankRows(client, trustId, generation, sources, part)
        : copyRankRowsApart(pool, trustId, generation, sources, part);
    }),
  );
  step('write the rows');
  // Statistics when this trust's ranks outnumber what the planner knows of the table (a first big ranking); after
  // that, a rebuild's churn gets the table analysed by autovacuum.
  const known = await sql<{ rows: number }>`
    SELECT reltuples::float8 AS rows FROM pg_class WHERE oid = 'portfolio_ranks'::regclass`.execute(trx);
  if (places.length > (known.rows[0]?.rows ?? 0)) await sql`ANALYZE portfolio_ranks`.execute(trx);
  step('analyse');
  const curve = await cumulativeCurve(trx, trustId, null, generation);
  step('curve');
  step.reportIfSlow(`Rebuilding the ranks of trust ${trustId} (${places.length} rooms)`);
  const values = {
    ranked_weights: JSON.stringify(weights),
    ranked_stamp: stampRow.stamp,
    ranked_generation: generation,
    ranked_at: new Date(),
    ranked_curve: JSON.stringify(curve),
  };
  await trx
    .insertInto('portfolio_settings')
    .values({ trust_id: trustId, ...values })
    .onConflict((oc) => oc.column('trust_id').doUpdateSet(values))
    .execute();
  return { state: { weights, stamp: stampRow.stamp, generation }, before: current?.ranked_generation ?? null };
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

/** Most points of the cumulative curve; the curve is sampled evenly along the ranked order. */
export const CUMULATIVE_MAX_POINTS = 200;

/** One point of the cumulative curve: capital and pupil-hours removed a year of every retrofit up to a rank. */
export interface CurvePoint {
  rank: number;
  cumulativeCapitalGbp: number;
  cumulativePupilHoursRemoved: number;
}

/**
 * The cumulative capital and pupil-hours removed along the ranked order (rooms with a retrofit), sampled to at most
 * CUMULATIVE_MAX_POINTS + 1 points, for the whole trust (stored with the ranks) or a member's schools.
 */
export async function cumulativeCurve(
  db: Kysely<Database>,
  trustId: string,
  schoolIds: readonly string[] | null,
  generation: number,
): Promise<CurvePoint[]> {
  const limited = schoolIds === null ? sql`TRUE` : sql`school_id = ANY(${[...schoolIds]}::uuid[])`;
  const { rows } = await sql<{ rank: number; cc: number; ch: number }>`
    WITH ordered AS (
      SELECT rank, sum(capital_cost_gbp) OVER w AS cc, sum(coalesce(pupil_hours_removed, 0)) OVER w AS ch,
        row_number() OVER w AS rn, count(*) OVER () AS n
      FROM portfolio_ranks
      WHERE trust_id = ${trustId} AND generation = ${generation} AND ${limited} AND unit_count > 0
        AND capital_cost_gbp IS NOT NULL
      WINDOW w AS (ORDER BY rank ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW)
    )
    SELECT rank, cc::float8 AS cc, ch::float8 AS ch FROM ordered
    WHERE rn % greatest(1, ceil(n / ${CUMULATIVE_MAX_POINTS}::float8))::int = 0 OR rn = n OR rn = 1
    ORDER BY rn`.execute(db);
  return rows.map((r) => ({
    rank: Number(r.rank),
    cumulativeCapitalGbp: r.cc,
    cumulativePupilHoursRemoved: r.ch,
  }));
}

/** The trust's cumulative curve as stored with its ranks (ensureRanks first). */
export async function storedCurve(db: Kysely<Database>, trustId: string): Promise<CurvePoint[]> {
  const row = await db
    .selectFrom('portfolio_settings')
    .select('ranked_curve')
    .where('trust_id', '=', trustId)
    .executeTakeFirst();
  return (row?.ranked_curve as CurvePoint[] | null | undefined) ?? [];
}

/**
 * A room's place in its trust under the saved weights (the rank every page and export shows), or null. Found through
 * the room's school (the ranks' school index): the ranks have no index by room.
 */
export async function getRoomRank(
  db: Kysely<Database>,
  trustId: string,
  roomId: string,
): Promise<{ rank: number; rankedRooms: number } | null> {
  const { generation } = await ensureRanks(db, trustId);
  // A generation's ranks run 1…n, so its last rank is its count: one step down the (trust, generation, rank) index
  // rather than counting every rank (about 0.1 s at 100,000 rooms, on every room page).
  const { rows } = await sql<{ rank: number; n: number }>`
    SELECT pr.rank,
      (SELECT x.rank FROM portfolio_ranks x WHERE x.trust_id = ${trustId} AND x.generation = ${generation}
       ORDER BY x.rank DESC LIMIT 1) AS n
    FROM rooms r JOIN portfolio_ranks pr
      ON pr.trust_id = ${trustId} AND pr.school_id = r.school_id AND pr.generation = ${generation} AND pr.room_id = r.id
    WHERE r.id = ${roomId}::uuid`.execute(db);
  const row = rows[0];
  return row ? { rank: row.rank, rankedRooms: row.n } : null;
}
