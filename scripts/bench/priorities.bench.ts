/**
 * GET /api/priorities at estate scale: 100,000 assessed rooms in a fresh bench trust, 20 concurrent
 * clients for 10 s on each of: sorted by rank, sorted by payback, filtered by one school.
 * Prints { priorities_p95_ms, priorities_rps, ... } as its last line.
 */
import { createRequire } from 'node:module';
import { sql } from 'kysely';
import { createDb } from '../../src/lib/server/db/client';
import { insertAssessedRooms } from '../../tests/integration/portfolio-fixture';

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
const log = (message: string) => console.error(`[priorities.bench] ${message}`);

function cookieFrom(response: Response): string {
  return response.headers
    .getSetCookie()
    .map((l) => l.split(';')[0] ?? '')
    .filter((p) => p.includes('=') && !p.endsWith('='))
    .join('; ');
}

/** Signs up a bench user, who becomes trust admin of a new, empty trust. */
async function signUpBenchTrust(): Promise<{ cookie: string; trustId: string }> {
  const email = `bench-${Date.now()}@bench.airtally.test`;
  const response = await fetch(`${APP_URL}/api/account/sign-up`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: APP_URL },
    body: JSON.stringify({
      name: 'Bench Admin',
      email,
      password: 'bench-password-2026',
      trustName: 'Bench Portfolio Trust',
    }),
  });
  if (response.status !== 201) throw new Error(`Bench sign-up failed: ${response.status} ${await response.text()}`);
  const body = (await response.json()) as { trust: { id: string } };
  return { cookie: cookieFrom(response), trustId: body.trust.id };
}

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

const db = createDb(DATABASE_URL);
try {
  const { cookie, trustId } = await signUpBenchTrust();
  const started = Date.now();
  const fixture = await insertAssessedRooms(db, {
    trustId,
    createTrust: false,
    schools: SCHOOLS,
    roomsPerSchool: ROOMS_PER_SCHOOL,
    label: 'Bench',
    seed: 0.17,
  });
  log(`inserted ${SCHOOLS * ROOMS_PER_SCHOOL} assessed rooms in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  // Steady state: statistics and visibility maps up to date, so autovacuum does not run during the load.
  await sql`VACUUM ANALYZE rooms, room_results, schools, blocks`.execute(db);

  const school = fixture.schoolIds[Math.floor(SCHOOLS / 2)]!;
  const scenarios = [
    ['by rank', '/api/priorities?sort=rank&page=1&pageSize=50'],
    ['by payback', '/api/priorities?sort=simplePaybackYears&dir=asc&page=1&pageSize=50'],
    ['one school', `/api/priorities?sort=rank&schoolId=${school}&page=1&pageSize=50`],
  ] as const;
  // The first request ranks the trust (100,000 rows) once; the load test measures the steady state.
  for (const [name, path] of scenarios) {
    const t = Date.now();
    const response = await fetch(`${APP_URL}${path}`, { headers: { cookie } });
    const body = (await response.json()) as { total?: number };
    if (response.status !== 200)
      throw new Error(`${name}: warm-up answered ${response.status} ${JSON.stringify(body)}`);
    log(`warm-up ${name}: ${Date.now() - t} ms, total ${body.total}`);
  }
  await sql`VACUUM ANALYZE portfolio_ranks`.execute(db);
  // A few seconds of unmeasured load so the server's JIT and Postgres's caches are warm for every scenario.
  for (const [, path] of scenarios)
    await autocannon({ url: `${APP_URL}${path}`, connections: 20, duration: 2, headers: { cookie } });
  const runs = [];
  for (const [name, path] of scenarios) runs.push(await load(name, path, cookie));
  const all = runs.flatMap((r) => r.times).sort((a, b) => a - b);
  console.log(
    JSON.stringify({
      priorities_p95_ms: Math.round(Math.max(...runs.map((r) => r.summary.p95Ms)) * 10) / 10,
      priorities_p95_ms_all_requests: Math.round(percentile(all, 95) * 10) / 10,
      priorities_rps: Math.round(runs.reduce((s, r) => s + r.summary.rps, 0) / runs.length),
      priorities_rooms: SCHOOLS * ROOMS_PER_SCHOOL,
    }),
  );
} finally {
  await db.destroy();
}
