// Monitor-log benchmark. (a) Import: writes a long-format CSV of 10 million 5-minute readings (300 rooms ×
// about 116 days, room codes as sensor names, ISO times), then previews and commits it in this process through
// the same service the upload route streams into; reports readings per second and the peak RSS of the import.
// (b) Analysis: a year of 5-minute readings for 300 rooms (31.5 million, stored directly as committed packed
// days), then one trust-wide analysis run (read, per-day statistics, seasons, decay and build-up fits, write).
// Prints one JSON object as the last line (scripts/bench.mjs merges it into bench/results.json).
import { createReadStream, createWriteStream, mkdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { once } from 'node:events';
import { sql } from 'kysely';
import { getDb, getPool, withConnection } from '../../src/lib/server/db/client';
import { copyLines } from '../../src/lib/server/db/copy';
import { runAnalysis } from '../../src/lib/server/monitor-logs/analysis.service';
import { commitLog, previewLog } from '../../src/lib/server/monitor-logs/import.service';
import { DAY_COPY_SQL, dayCopyLine } from '../../src/lib/server/monitor-logs/packing';
import { localMidnightUtc } from '../../src/lib/server/monitor-logs/timestamps';
import { prng } from '../seed/prng';

const ROOMS = 300;
const READINGS = Number(process.env.BENCH_LOG_READINGS ?? 10_000_000);
const STEP_MIN = 5;
const DIR = join(process.cwd(), '.data', 'bench-logs');
const FILE = join(DIR, 'long-10m.csv');
const log = (message: string) => console.error(`[logs.bench] ${message}`);
const stamp = Date.now();

/** A school day's CO2 at each 5-minute step: lessons build up, breaks and evenings decay (exact solution). */
function dayPpm(weekday: boolean, random: () => number, lessonAch: number): Int16Array {
  const out = new Int16Array(1440 / STEP_MIN);
  let c = 430;
  for (let k = 0; k < out.length; k++) {
    const m = k * STEP_MIN;
    const lesson = weekday && ((m >= 540 && m < 660) || (m >= 675 && m < 735) || (m >= 795 && m < 915));
    const ach = lesson ? lessonAch : weekday && m >= 540 && m < 930 ? 3 : 0.4;
    const steady = 420 + (lesson ? 3000 / ach : 0);
    c = steady + (c - steady) * Math.exp((-ach * STEP_MIN) / 60);
    out[k] = Math.round(c + (random() - 0.5) * 24);
  }
  return out;
}

const pad = (n: number) => String(n).padStart(2, '0');

async function writeCsv(): Promise<number> {
  mkdirSync(DIR, { recursive: true });
  const out = createWriteStream(FILE);
  const random = prng(20261204);
  out.write('Timestamp,Sensor,CO2 (ppm)\n');
  const perDay = ROOMS * (1440 / STEP_MIN);
  const days = Math.ceil(READINGS / perDay);
  let written = 0;
  const t0 = Date.parse('2026-01-05T00:00:00Z');
  for (let d = 0; d < days && written < READINGS; d++) {
    const date = new Date(t0 + d * 86_400_000);
    const iso = date.toISOString().slice(0, 10);
    const weekday = date.getUTCDay() >= 1 && date.getUTCDay() <= 5;
    const curves = Array.from({ length: ROOMS }, (_, r) => dayPpm(weekday, random, 1 + (r % 5)));
    const lines: string[] = [];
    for (let k = 0; k < 1440 / STEP_MIN && written < READINGS; k++) {
      const time = `${iso} ${pad(Math.floor((k * STEP_MIN) / 60))}:${pad((k * STEP_MIN) % 60)}:00`;
      for (let r = 0; r < ROOMS && written < READINGS; r++, written++)
        lines.push(`${time},R${String(r + 1).padStart(3, '0')},${curves[r]![k]}\n`);
    }
    if (!out.write(lines.join(''))) await once(out, 'drain');
  }
  out.end();
  await once(out, 'finish');
  return written;
}

async function benchTrust(id: string): Promise<string[]> {
  const db = getDb();
  await db.insertInto('trusts').values({ id, name: 'Logs Bench Trust', slug: id }).execute();
  const school = await db
    .insertInto('schools')
    .values({
      trust_id: id,
      name: 'Logs Bench School',
      phase: 'secondary',
      climate_region: 'midlands',
      heating_fuel: 'gas',
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  const rows = await db
    .insertInto('rooms')
    .values(
      Array.from({ length: ROOMS }, (_, r) => ({
        school_id: school.id,
        code: `R${String(r + 1).padStart(3, '0')}`,
        use: 'classroom',
        floor_area_m2: 56,
        ceiling_height_m: 3,
        pupils: 30,
        adults: 1,
        age_group: 'secondary',
        glazing_area_m2: 12,
        openable_area_m2: 2,
        ventilation_type: 'natural_single_sided',
      })),
    )
    .returning('id')
    .execute();
  return rows.map((r) => r.id);
}

/** A committed log holding a year of packed 5-minute days for every room (set up directly, not timed). */
async function storeYear(trustId: string, roomIds: string[]): Promise<number> {
  const db = getDb();
  const logRow = await db
    .insertInto('monitor_logs')
    .values({
      trust_id: trustId,
      file_name: 'year.csv',
      file_kind: 'csv',
      file_size_bytes: 0,
      status: 'committed',
      layout: '{}',
      time_basis: 'Europe/London',
      problems: '[]',
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  const sensors = await db
    .insertInto('monitor_log_sensors')
    .values(
      roomIds.map((roomId, i) => ({
        log_id: logRow.id,
        trust_id: trustId,
        sensor_key: `R${i + 1}`,
        room_id: roomId,
        match: 'room_code' as const,
        reading_count: 0,
        day_count: 365,
      })),
    )
    .returning('id')
    .execute();
  const random = prng(7);
  const t0 = Date.parse('2025-09-01T00:00:00Z');
  let readings = 0;
  await withConnection(getPool(), async (_db, client) => {
    await client.query('BEGIN');
    function* lines() {
      for (let d = 0; d < 365; d++) {
        const date = new Date(t0 + d * 86_400_000);
        const iso = date.toISOString().slice(0, 10);
        const weekday = date.getUTCDay() >= 1 && date.getUTCDay() <= 5;
        const start = localMidnightUtc(iso);
        const length = localMidnightUtc(new Date(t0 + (d + 1) * 86_400_000).toISOString().slice(0, 10)) - start;
        const n = Math.floor(length / (STEP_MIN * 60));
        const base = dayPpm(weekday, random, 2);
        let piece = '';
        for (let s = 0; s < sensors.length; s++) {
          const times = new Int32Array(n);
          const ppm = new Int16Array(n);
          for (let k = 0; k < n; k++) {
            times[k] = k * STEP_MIN * 60;
            ppm[k] = (base[k % base.length] as number) + ((s * 7) % 40);
          }
          readings += n;
          piece += dayCopyLine(sensors[s]!.id, { date: iso, times, ppm, extras: null });
        }
        yield piece;
      }
    }
    await copyLines(client, DAY_COPY_SQL, lines());
    await client.query('COMMIT');
  });
  return readings;
}

const db = getDb();
const importTrust = `bench-logs-import-${stamp}`;
const analysisTrust = `bench-logs-analysis-${stamp}`;
try {
  log(`writing a CSV of ${READINGS.toLocaleString('en-GB')} readings`);
  const written = await writeCsv();
  await benchTrust(importTrust);
  const trust = { id: importTrust, name: 'Logs Bench Trust', role: 'trust_admin' as const, schoolIds: null };
  const actor = { actorUserId: null, actorEmail: 'bench@bench.airtally.test' };

  const t0 = performance.now();
  const preview = await previewLog(
    getPool(),
    trust,
    actor,
    { fileName: 'long-10m.csv', stream: createReadStream(FILE, { highWaterMark: 1024 * 1024 }) },
    { timeBasis: null, schoolId: null },
  );
  const tPreview = performance.now();
  // The analysis is not queued here: (b) times it on its own.
  const { outcome } = await commitLog(db, trust, actor, preview.id, 'commit', { queueAnalysis: false });
  const importSeconds = (performance.now() - t0) / 1000;
  const importRssMb = process.resourceUsage().maxRSS / 1024;
  log(
    `import: preview ${((tPreview - t0) / 1000).toFixed(2)} s, commit ${((performance.now() - tPreview) / 1000).toFixed(2)} s; ${outcome.readingsImported} readings for ${outcome.rooms} rooms; peak RSS ${Math.round(importRssMb)} MB`,
  );
  if (outcome.readingsImported !== written)
    throw new Error(`expected ${written} readings imported, got ${outcome.readingsImported}`);
  const stored = await sql<{
    bytes: number;
  }>`SELECT pg_total_relation_size('monitor_log_days')::float8 AS bytes`.execute(db);
  log(`monitor_log_days now ${(stored.rows[0]!.bytes / 1024 / 1024).toFixed(0)} MB`);

  log('storing a year of 5-minute readings for 300 rooms');
  const roomIds = await benchTrust(analysisTrust);
  const yearReadings = await storeYear(analysisTrust, roomIds);
  log(`stored ${yearReadings.toLocaleString('en-GB')} readings`);
  const run = await db
    .insertInto('monitor_analysis_runs')
    .values({ trust_id: analysisTrust, room_ids: null, created_by_email: 'bench' })
    .returning('id')
    .executeTakeFirstOrThrow();
  const t1 = performance.now();
  await runAnalysis(db, getPool(), run.id);
  const analysisSeconds = (performance.now() - t1) / 1000;
  const analysed = await db
    .selectFrom('monitor_room_analyses')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('trust_id', '=', analysisTrust)
    .executeTakeFirstOrThrow();
  log(`analysis: ${Number(analysed.n)} rooms in ${analysisSeconds.toFixed(2)} s`);
  if (Number(analysed.n) !== ROOMS) throw new Error(`expected ${ROOMS} rooms analysed, got ${analysed.n}`);

  console.log(
    JSON.stringify({
      logs_import_readings_per_s: Math.round(written / importSeconds),
      logs_import_peak_rss_mb: Math.round(importRssMb),
      logs_import_s: Math.round(importSeconds * 100) / 100,
      logs_import_readings: written,
      logs_analysis_s: Math.round(analysisSeconds * 100) / 100,
      logs_analysis_readings: yearReadings,
      logs_analysis_rooms: ROOMS,
    }),
  );
} finally {
  await sql`DELETE FROM trusts WHERE id IN (${importTrust}, ${analysisTrust})`.execute(db).catch(() => undefined);
  rmSync(FILE, { force: true });
  await db.destroy();
}
