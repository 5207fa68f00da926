// Batch benchmark: 100,000 generated rooms in a bench trust; the I/O floor (read the rooms, COPY as many
// result rows into a scratch table) against the full batch (read, assess, write results, flip current),
// both in this process. The scratch table has room_results' physical layout (compression, toast target)
// but no indexes or constraints, so the floor is the cheapest way to move the same bytes. Prints one JSON object as the last line (scripts/bench.mjs merges it).
import { sql } from 'kysely';
import { assessRoom, DEFAULT_RANK_WEIGHTS, rankOrder } from '../../src/lib/engine';
import { ensureRanks, loadRankParts } from '../../src/lib/server/portfolio/ranking.repository';
import { getDb, getPool } from '../../src/lib/server/db/client';
import { getCurrentAssumptionSet } from '../../src/lib/server/assessments/assumptions.repository';
import { readRoomChunk } from '../../src/lib/server/assessments/engine-input.repository';
import { toResultRow } from '../../src/lib/server/assessments/result-row';
import { copyResultsSql, toCopyLine } from '../../src/lib/server/assessments/results.repository';
import { copyLines } from '../../src/lib/server/db/copy';
import { executeRun } from '../../src/lib/server/assessments/run-executor';
import { getRun, insertRun } from '../../src/lib/server/assessments/runs.repository';
import { prng } from '../seed/prng';

const ROOMS = Number(process.env.BENCH_BATCH_ROOMS ?? 100_000);
const SCHOOLS = 50;
const CHUNK = 2000;
const TRUST_ID = `bench-trust-${Date.now()}`;
const log = (message: string) => console.error(`[batch.bench] ${message}`);

async function generateEstate(): Promise<void> {
  const db = getDb();
  const random = prng(20261201);
  const between = (lo: number, hi: number) => lo + (hi - lo) * random();
  const pick = <T>(items: readonly T[]) => items[Math.floor(random() * items.length)]!;
  await db.insertInto('trusts').values({ id: TRUST_ID, name: 'Bench Trust', slug: TRUST_ID }).execute();
  const regions = [
    'london_south_east',
    'south_west',
    'east_anglia',
    'midlands',
    'north_west',
    'north_east',
    'wales',
    'scotland',
    'northern_ireland',
  ] as const;
  const blocks: { id: string; schoolId: string }[] = [];
  for (let s = 0; s < SCHOOLS; s += 1) {
    const school = await db
      .insertInto('schools')
      .values({
        trust_id: TRUST_ID,
        name: `Bench School ${s + 1}`,
        phase: s % 3 === 0 ? 'primary' : 'secondary',
        climate_region: regions[s % regions.length]!,
        heating_fuel: 'gas',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    for (let b = 0; b < 2; b += 1) {
      const block = await db
        .insertInto('blocks')
        .values({
          school_id: school.id,
          name: `Block ${b + 1}`,
          year_built: Math.round(between(1950, 2020)),
          construction_type: pick(['cavity_masonry', 'system_built', 'solid_masonry']),
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      blocks.push({ id: block.id, schoolId: school.id });
    }
  }
  const lines: string[] = [];
  for (let i = 0; i < ROOMS; i += 1) {
    const block = blocks[i % blocks.length]!;
    const floor = Number(between(45, 70).toFixed(1));
    const glazing = Number((floor * between(0.15, 0.3)).toFixed(1));
    const openable = Number(Math.min(glazing, floor * between(0.01, 0.06)).toFixed(2));
    const vent = pick([
      'natural_single_sided',
      'natural_single_sided',
      'natural_cross',
      'mechanical_supply_extract',
    ] as const);
    lines.push(
      `${[
        block.schoolId,
        block.id,
        `R${String(i).padStart(6, '0')}`,
        `Room ${i}`,
        'classroom',
        floor,
        Number(between(2.4, 3.2).toFixed(2)),
        Math.round(between(20, 32)),
        1,
        'secondary',
        pick([0, 90, 180, 270]),
        glazing,
        openable,
        'side_hung',
        '\\N',
        vent,
        vent === 'mechanical_supply_extract' ? Math.round(between(80, 200)) : '\\N',
      ].join('\t')}\n`,
    );
  }
  const client = await getPool().connect();
  try {
    await copyLines(
      client,
      `COPY rooms (school_id, block_id, code, name, use, floor_area_m2, ceiling_height_m, pupils, adults, age_group, orientation_deg,
        glazing_area_m2, openable_area_m2, window_type, glazing_g_value, ventilation_type, mechanical_supply_lps) FROM STDIN`,
      lines,
    );
  } finally {
    client.release();
  }
  await sql`ANALYZE rooms`.execute(db);
}

/** Peak resident set size while `work` runs, sampled every 20 ms. */
async function withPeakRss<T>(work: () => Promise<T>): Promise<{ result: T; peakRssMb: number }> {
  let peak = process.memoryUsage().rss;
  const timer = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
  }, 20);
  try {
    const result = await work();
    peak = Math.max(peak, process.memoryUsage().rss);
    return { result, peakRssMb: peak / 1024 / 1024 };
  } finally {
    clearInterval(timer);
  }
}

/** The I/O floor: read every room in the same chunks, COPY the same number of result-shaped rows into a scratch table. */
async function ioFloor(templateLine: (roomId: string) => string): Promise<number> {
  const db = getDb();
  await sql`DROP TABLE IF EXISTS bench_results_scratch`.execute(db);
  await sql`CREATE TABLE bench_results_scratch (LIKE room_results INCLUDING DEFAULTS INCLUDING COMPRESSION) WITH (toast_tuple_target = 256)`.execute(
    db,
  );
  const started = performance.now();
  let cursor: string | null = null;
  for (;;) {
    const rooms = await readRoomChunk(db, { trustId: TRUST_ID, schoolId: null }, cursor, CHUNK);
    if (rooms.length === 0) break;
    cursor = rooms[rooms.length - 1]!.roomId;
    const client = await getPool().connect();
    try {
      await client.query('BEGIN');
      await copyLines(
        client,
        copyResultsSql('bench_results_scratch'),
        (function* () {
          for (const r of rooms) yield templateLine(r.roomId);
        })(),
      );
      await client.query('COMMIT');
    } finally {
      client.release();
    }
  }
  const seconds = (performance.now() - started) / 1000;
  await sql`DROP TABLE bench_results_scratch`.execute(db);
  return seconds;
}

async function fullBatch(): Promise<number> {
  const db = getDb();
  const assumptions = await getCurrentAssumptionSet(db, TRUST_ID);
  const { id: runId } = await insertRun(db, {
    trustId: TRUST_ID,
    schoolId: null,
    assumptionSetId: assumptions.id,
    assumptionsVersion: assumptions.label,
    startedByUserId: null,
    startedByEmail: 'bench',
  });
  const started = performance.now();
  let lastChunkAt = started;
  await executeRun(db, getPool(), runId, {
    chunkSize: CHUNK,
    afterChunk: () => {
      lastChunkAt = performance.now();
    },
  });
  const flippedAt = performance.now();
  // The trust's ranks by the engine's one rule, as the first page read after the run builds them.
  await ensureRanks(db, TRUST_ID);
  const seconds = (performance.now() - started) / 1000;
  log(
    `chunks written in ${((lastChunkAt - started) / 1000).toFixed(2)} s, make current ${((flippedAt - lastChunkAt) / 1000).toFixed(2)} s, rank ${((performance.now() - flippedAt) / 1000).toFixed(2)} s`,
  );
  const run = await getRun(db, runId, TRUST_ID);
  if (run?.status !== 'succeeded') throw new Error(`bench run ended ${run?.status}: ${run?.error}`);
  const current = await db
    .selectFrom('room_results')
    .select(sql<number>`count(*)::int`.as('n'))
    .where('trust_id', '=', TRUST_ID)
    .where('is_current', '=', true)
    .executeTakeFirstOrThrow();
  if (current.n + run.problems.length !== ROOMS)
    throw new Error(`expected ${ROOMS} current results, found ${current.n}`);
  await checkRanksMatchEngine();
  return seconds;
}

/** The trust's stored ranks (portfolio_ranks) must equal the engine's rankOrder over the stored parts of the same rows. */
async function checkRanksMatchEngine(): Promise<void> {
  const parts = await loadRankParts(getDb(), TRUST_ID);
  const expected = rankOrder(parts, DEFAULT_RANK_WEIGHTS);
  const { rows } = await sql<{ room_id: string; rank: number }>`
    SELECT room_id, rank FROM portfolio_ranks WHERE trust_id = ${TRUST_ID}`.execute(getDb());
  const stored = new Map(rows.map((r) => [r.room_id, r.rank]));
  if (stored.size !== expected.length) throw new Error(`${stored.size} stored ranks for ${expected.length} results`);
  for (const e of expected)
    if (stored.get(e.row.roomId) !== e.rank)
      throw new Error(
        `stored rank of ${e.row.roomId} (${stored.get(e.row.roomId)}) differs from the engine's (${e.rank})`,
      );
  log(`stored ranks match rankOrder for ${expected.length} rooms`);
}

async function main(): Promise<void> {
  log(`generating ${ROOMS} rooms`);
  await generateEstate();
  const db = getDb();
  const assumptions = await getCurrentAssumptionSet(db, TRUST_ID);
  const [sample] = await readRoomChunk(db, { trustId: TRUST_ID, schoolId: null }, null, 1);
  const template = toResultRow(
    '00000000-0000-0000-0000-000000000000',
    sample!,
    assessRoom(sample!.input, assumptions.set, { withCurve: false }),
  );
  const templateLine = (roomId: string) => toCopyLine({ ...template, roomId });

  log('I/O floor (read rooms + COPY result rows)');
  const floor1 = await ioFloor(templateLine);
  log(`floor ${floor1.toFixed(2)} s; full batch`);
  const { result: batchSeconds, peakRssMb } = await withPeakRss(fullBatch);
  log(`batch ${batchSeconds.toFixed(2)} s, peak RSS ${peakRssMb.toFixed(0)} MB; floor again`);
  const floor2 = await ioFloor(templateLine);
  const floor = Math.min(floor1, floor2);
  log(`floor ${floor2.toFixed(2)} s`);
  await db.destroy();
  console.log(
    JSON.stringify({
      batch_ratio_vs_io_floor: Number((batchSeconds / floor).toFixed(3)),
      batch_peak_rss_mb: Math.round(peakRssMb),
      batch_rooms_per_s: Math.round(ROOMS / batchSeconds),
      batch_seconds: Number(batchSeconds.toFixed(2)),
      batch_io_floor_seconds: Number(floor.toFixed(2)),
      batch_rooms: ROOMS,
    }),
  );
}

main().catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});
