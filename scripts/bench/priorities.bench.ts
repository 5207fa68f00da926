/**
 * Reads at estate scale, in a fresh bench trust each:
 *  - 100,000 assessed rooms (100 schools): GET /api/priorities with 20 concurrent clients for 10 s on each of sorted
 *    by rank, sorted by payback, filtered by one school;
 *  - national scale, 550,000 rooms in 22,000 schools (BENCH_PRIORITIES_NATIONAL=0 skips it): the same three, the
 *    dashboard (GET /api/dashboard, its aggregates) with 20 clients, and the results workbook streamed
 *    (GET /api/exports/results.xlsx: first byte, whole file, size).
 * Prints { priorities_p95_ms, priorities_rps, priorities_550k_p95_ms, dashboard_550k_p95_ms, ... } as its last line.
 */
import { createRequire } from 'node:module';
import { sql } from 'kysely';
import { createDb } from '../../src/lib/server/db/client';
import { insertAssessedRooms } from '../../tests/integration/portfolio-fixture';
import { createOtherTrust } from '../../tests/helpers/session';

const APP_URL = (process.env.APP_URL ?? '').replace(/\/$/, '');
const DATABASE_URL = process.env.DATABASE_URL ?? '';
if (!APP_URL || !DATABASE_URL) throw new Error('Run through `npm run bench` (APP_URL and DATABASE_URL are needed).');

/** The part of autocannon's API used here (the package ships no types). */
interface AutocannonResult {
  non2xx: number;
  errors: number;
  timeouts: number;
  requests: { average: number; total: number };
}
interface AutocannonInstance extends PromiseLike<AutocannonResult> {
  on(
    event: 'response',
    listener: (client: unknown, statusCode: number, bytes: number, responseTimeMs: number) => void,
  ): void;
}
const autocannon = createRequire(import.meta.url)('autocannon') as (options: {
  url: string;
  connections: number;
  duration: number;
  headers: Record<string, string>;
}) => AutocannonInstance;

const SCHOOLS = 100;
const ROOMS_PER_SCHOOL = 1000;
/** National scale: about 22,000 schools and 550,000 teaching rooms (from memory). */
const NATIONAL_SCHOOLS = 22_000;
const NATIONAL_ROOMS_PER_SCHOOL = 25;
const NATIONAL = process.env.BENCH_PRIORITIES_NATIONAL !== '0';
const log = (message: string) => console.error(`[priorities.bench] ${message}`);

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return Number.NaN;
  const index = Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1);
  return sorted[Math.max(0, index)]!;
}

async function load(name: string, path: string, cookie: string) {
  const times: number[] = [];
  const instance = autocannon({ url: `${APP_URL}${path}`, connections: 20, duration: 10, headers: { cookie } });
  instance.on('response', (_client, statusCode, _bytes, responseTime) => {
    if (statusCode === 200) times.push(responseTime);
  });
  const result = await instance;
  times.sort((a, b) => a - b);
  const bad = result.non2xx + result.errors + result.timeouts;
  if (bad > 0) throw new Error(`${name}: ${bad} failed requests of ${result.requests.total}`);
  const summary = {
    name,
    p50Ms: percentile(times, 50),
    p95Ms: percentile(times, 95),
    rps: result.requests.average,
    requests: result.requests.total,
  };
  log(JSON.stringify(summary));
  return { summary, times };
}

/** A fresh bench trust with `schools` × `roomsPerSchool` assessed rooms, vacuumed and analysed. */
async function benchEstate(schools: number, roomsPerSchool: number) {
  // A new account naming a new trust (its trust admin), signed up as a person would: confirmation e-mail and all.
  const { cookie, trustId } = await createOtherTrust();
  const started = Date.now();
  const fixture = await insertAssessedRooms(db, {
    trustId,
    createTrust: false,
    schools,
    roomsPerSchool,
    label: 'Bench',
    seed: 0.17,
  });
  log(`inserted ${schools * roomsPerSchool} assessed rooms in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  // Steady state: statistics and visibility maps up to date, so autovacuum does not run during the load.
  await sql`VACUUM ANALYZE rooms, room_results, schools, blocks`.execute(db);
  return { cookie, school: fixture.schoolIds[Math.floor(schools / 2)]! };
}

/** Warms each path once (the first priorities request ranks the trust), then loads each with 20 clients for 10 s. */
async function loadScenarios(scenarios: readonly (readonly [string, string])[], cookie: string) {
  for (const [name, path] of scenarios) {
    const t = Date.now();
    const response = await fetch(`${APP_URL}${path}`, { headers: { cookie } });
    const body = (await response.json()) as { total?: number };
    if (response.status !== 200)
      throw new Error(`${name}: warm-up answered ${response.status} ${JSON.stringify(body)}`);
    log(`warm-up ${name}: ${Date.now() - t} ms${body.total === undefined ? '' : `, total ${body.total}`}`);
  }
  await sql`VACUUM ANALYZE portfolio_ranks`.execute(db);
  // A few seconds of unmeasured load so the server's JIT and Postgres's caches are warm for every scenario.
  for (const [, path] of scenarios)
    await autocannon({ url: `${APP_URL}${path}`, connections: 20, duration: 2, headers: { cookie } });
  const runs = [];
  for (const [name, path] of scenarios) runs.push(await load(name, path, cookie));
  return runs;
}

const prioritiesScenarios = (school: string) =>
  [
    ['by rank', '/api/priorities?sort=rank&page=1&pageSize=50'],
    ['by payback', '/api/priorities?sort=simplePaybackYears&dir=asc&page=1&pageSize=50'],
    ['one school', `/api/priorities?sort=rank&schoolId=${school}&page=1&pageSize=50`],
  ] as const;

/** Streams the results workbook: ms to the first byte, seconds for the whole file, its size. */
async function streamExport(path: string, cookie: string) {
  const started = performance.now();
  const response = await fetch(`${APP_URL}${path}`, { headers: { cookie } });
  if (response.status !== 200 || !response.body) throw new Error(`${path} answered ${response.status}`);
  let firstByteMs = Number.NaN;
  let bytes = 0;
  for await (const piece of response.body) {
    if (bytes === 0) firstByteMs = performance.now() - started;
    bytes += piece.byteLength;
  }
  return { firstByteMs, seconds: (performance.now() - started) / 1000, bytes };
}

const p95 = (runs: { summary: { p95Ms: number } }[]) =>
  Math.round(Math.max(...runs.map((r) => r.summary.p95Ms)) * 10) / 10;

const db = createDb(DATABASE_URL);
try {
  const estate = await benchEstate(SCHOOLS, ROOMS_PER_SCHOOL);
  const runs = await loadScenarios(prioritiesScenarios(estate.school), estate.cookie);
  const all = runs.flatMap((r) => r.times).sort((a, b) => a - b);
  const figures: Record<string, unknown> = {
    priorities_p95_ms: p95(runs),
    priorities_p95_ms_all_requests: Math.round(percentile(all, 95) * 10) / 10,
    priorities_rps: Math.round(runs.reduce((s, r) => s + r.summary.rps, 0) / runs.length),
    priorities_rooms: SCHOOLS * ROOMS_PER_SCHOOL,
  };
  if (NATIONAL) {
    const national = await benchEstate(NATIONAL_SCHOOLS, NATIONAL_ROOMS_PER_SCHOOL);
    const priorities = await loadScenarios(prioritiesScenarios(national.school), national.cookie);
    const [dashboard] = await loadScenarios([['dashboard', '/api/dashboard']], national.cookie);
    const exported = await streamExport('/api/exports/results.xlsx', national.cookie);
    log(
      `results.xlsx: first byte ${exported.firstByteMs.toFixed(0)} ms, ${exported.seconds.toFixed(1)} s, ${exported.bytes} bytes`,
    );
    Object.assign(figures, {
      priorities_550k_p95_ms: p95(priorities),
      priorities_550k_p95_ms_by_scenario: Object.fromEntries(
        priorities.map((r) => [r.summary.name, Math.round(r.summary.p95Ms * 10) / 10]),
      ),
      dashboard_550k_p95_ms: Math.round(dashboard!.summary.p95Ms * 10) / 10,
      dashboard_550k_p50_ms: Math.round(dashboard!.summary.p50Ms * 10) / 10,
      results_export_550k_first_byte_ms: Math.round(exported.firstByteMs),
      results_export_550k_seconds: Number(exported.seconds.toFixed(1)),
      results_export_550k_bytes: exported.bytes,
      reads_550k_rooms: NATIONAL_SCHOOLS * NATIONAL_ROOMS_PER_SCHOOL,
    });
  }
  console.log(JSON.stringify(figures));
} finally {
  await db.destroy();
}
