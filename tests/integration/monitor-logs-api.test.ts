/**
 * Monitor-log import through the running app: every messy-file case with its expected outcome, hostile files
 * refused with a 400 that changes nothing, preview → map → all-or-nothing commit, the analysis, calibration and
 * its revert, deletion of exactly a log's readings, and what a school-limited member may see and do.
 */
import ExcelJS from 'exceljs';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, api, signIn, signUp, uniqueEmail } from '../helpers/session';
import { dates, dayFirst, isoText, longCsv, wideCsv } from './monitor-logs-fixture';
import { waitFor } from '../helpers/wait';

const db = testDb();
let estates: string;
let viewer: string;
let admin: string;
let schoolA: { id: string; rooms: { id: string; code: string }[] };
let schoolB: { id: string; rooms: { id: string; code: string }[] };

interface Problem {
  kind: string;
  count: number;
  examples: { row?: number; at?: string; detail: string }[];
}
interface Sensor {
  id: string;
  sensorKey: string;
  match: string;
  roomId: string | null;
  readings: number;
  days: number;
  extras: { key: string; kind: string }[];
  problems: Problem[];
}
interface Log {
  id: string;
  status: string;
  timeBasis: string;
  readings: number;
  layout: { kind: string; basisReason: string; timeFormat: { format: string } };
  problems: Problem[];
  sensors: Sensor[];
}

async function upload(cookie: string, fileName: string, body: string | Buffer, query = ''): Promise<Response> {
  return api(`/api/monitor-logs?fileName=${encodeURIComponent(fileName)}${query}`, {
    method: 'POST',
    cookie,
    headers: { 'content-type': 'application/octet-stream' },
    body: new Uint8Array(typeof body === 'string' ? Buffer.from(body) : body),
  });
}

async function preview(cookie: string, fileName: string, body: string | Buffer, query = ''): Promise<Log> {
  const response = await upload(cookie, fileName, body, query);
  const text = await response.text();
  expect(response.status, text).toBe(201);
  return JSON.parse(text) as Log;
}

async function commit(cookie: string, id: string, action: 'commit' | 'cancel' = 'commit') {
  const response = await api(`/api/monitor-logs/${id}/commit`, {
    method: 'POST',
    cookie,
    body: JSON.stringify({ action }),
  });
  const text = await response.text();
  expect(response.status, text).toBe(200);
  return JSON.parse(text) as {
    outcome: { readingsImported: number; sensorsLeftOut: number; rooms: number };
    analysisRunId: string | null;
  };
}

/** Waits for the trust's latest analysis run to finish; throws when it fails or takes longer than a minute. */
async function analysed(cookie: string): Promise<void> {
  await waitFor(
    'the analysis finishes',
    async () => {
      const { run } = (await (await api('/api/monitor-logs/analysis', { cookie })).json()) as {
        run: { status: string; error: string | null } | null;
      };
      if (run?.status === 'failed') throw new Error(`analysis failed: ${run.error}`);
      return run?.status === 'succeeded';
    },
    { timeoutMs: 60_000, intervalMs: 250 },
  );
}

const problem = (log: { problems: Problem[] }, kind: string) => log.problems.find((p) => p.kind === kind)?.count ?? 0;
const countRows = async (table: 'monitor_logs' | 'monitor_log_days' | 'audit_events') =>
  Number((await sql<{ n: number }>`SELECT count(*)::int AS n FROM ${sql.table(table)}`.execute(db)).rows[0]!.n);

beforeAll(async () => {
  [estates, viewer, admin] = await Promise.all([
    signIn(DEMO_ACCOUNTS.estates_manager),
    signIn(DEMO_ACCOUNTS.viewer),
    signIn(DEMO_ACCOUNTS.trust_admin),
  ]);
  const schools = await db
    .selectFrom('schools')
    .select('id')
    .where('trust_id', '=', 'demo-trust')
    .orderBy('name')
    .limit(2)
    .execute();
  const roomsOf = async (id: string) =>
    db
      .selectFrom('rooms')
      .select(['id', 'code'])
      .where('school_id', '=', id)
      .where('use', '=', 'classroom')
      .orderBy('code')
      .limit(4)
      .execute();
  schoolA = { id: schools[0]!.id, rooms: await roomsOf(schools[0]!.id) };
  schoolB = { id: schools[1]!.id, rooms: await roomsOf(schools[1]!.id) };
});

afterAll(async () => {
  // Leave the shared demo trust as seeded, which has no measured CO2: the logs, mappings, analyses and calibrations
  // these tests made for it go (sensors and days go with their logs).
  for (const table of [
    'room_calibrations',
    'monitor_room_analyses',
    'monitor_room_days',
    'monitor_sensor_mappings',
    'monitor_analysis_runs',
    'monitor_logs',
  ] as const)
    await db.deleteFrom(table).where('trust_id', '=', 'demo-trust').execute();
  await db.destroy();
});

describe('monitor log import', () => {
  it('reads a long CSV, matches sensors by room code, reports its problems and commits all-or-nothing', async () => {
    const [r1, r2] = schoolA.rooms;
    const days = dates('2026-01-05', 5);
    let csv = longCsv([r1!.code, `Monitor ${r2!.code}`], days, 5);
    // Messy rows: a duplicate, a conflicting duplicate, an out-of-range value, a negative one, a value below
    // outdoor air, an unreadable time and an unreadable CO2 value.
    csv += `${isoText('2026-01-05', 600)},${r1!.code},700,20.0\n`; // same time as a generated row, different value
    csv += `2026-01-09 23:55:00,${r1!.code},12000,20\n`;
    csv += `2026-01-09 23:56:00,${r1!.code},-5,20\n`;
    csv += `2026-01-09 23:57:00,${r1!.code},150,20\n`;
    csv += `not a time,${r1!.code},600,20\n`;
    csv += `2026-01-09 23:58:00,${r1!.code},n/a,20\n`;
    csv += `2026-01-09 23:59:00,Cupboard sensor,600,20\n`;
    const logsBefore = await countRows('monitor_logs');
    const log = await preview(estates, 'long.csv', csv);
    expect(log.status).toBe('previewed');
    expect(log.layout.kind).toBe('long');
    const s1 = log.sensors.find((s) => s.sensorKey === r1!.code)!;
    const s2 = log.sensors.find((s) => s.sensorKey === `Monitor ${r2!.code}`)!;
    expect(s1).toMatchObject({ match: 'room_code', roomId: r1!.id });
    expect(s2).toMatchObject({ match: 'room_code', roomId: r2!.id });
    expect(log.sensors.find((s) => s.sensorKey === 'Cupboard sensor')?.match).toBe('unmatched');
    expect(s1.extras.map((e) => e.kind)).toEqual(['temperature']);
    expect(problem(log, 'conflicting_duplicate')).toBe(2);
    expect(problem(log, 'out_of_range')).toBe(2);
    expect(problem(log, 'below_outdoor')).toBe(1);
    expect(problem(log, 'time_unreadable')).toBe(1);
    expect(problem(log, 'co2_unreadable')).toBe(1);
    // 5 days × 288 readings, less the two conflicting ones at 10:00 on the first day.
    expect(s1.readings).toBe(5 * 288 - 1);
    expect(await countRows('monitor_logs')).toBe(logsBefore + 1);

    // Nothing counts before the commit.
    const beforeCommit = (await (await api(`/api/measured/rooms/${r1!.id}`, { cookie: viewer })).json()) as {
      analysis: unknown;
    };
    expect(beforeCommit.analysis).toBeNull();

    const { outcome } = await commit(estates, log.id);
    expect(outcome).toMatchObject({ rooms: 2, sensorsLeftOut: 1 });
    expect(outcome.readingsImported).toBe(s1.readings + s2.readings);
    await analysed(estates);
    const view = (await (await api(`/api/measured/rooms/${r1!.id}`, { cookie: viewer })).json()) as {
      analysis: { days: number; seasons: { winter?: { days: number; occupiedMeanPpm: number } } };
      charts: { season: string; days: unknown[]; predicted: unknown[] }[];
    };
    expect(view.analysis.seasons.winter?.days).toBe(5);
    expect(view.analysis.seasons.winter?.occupiedMeanPpm).toBeGreaterThan(1000);
    expect(view.charts[0]?.days.length).toBe(5);
    expect(view.charts[0]?.predicted.length).toBeGreaterThan(10);

    const again = await api(`/api/monitor-logs/${log.id}/commit`, {
      method: 'POST',
      cookie: estates,
      body: JSON.stringify({ action: 'commit' }),
    });
    expect(again.status).toBe(409);
  });

  it('reads a wide CSV with day-first times without seconds and drops repeated readings once', async () => {
    const [r1, r2] = schoolB.rooms;
    let csv = wideCsv([r1!.code, r2!.code], dates('2026-02-02', 2), 10);
    const lines = csv.trim().split('\n');
    csv = `${[...lines, lines[100]!].join('\n')}\n`; // the same row twice
    const log = await preview(estates, 'wide.csv', csv);
    expect(log.layout.kind).toBe('wide');
    expect(log.layout.timeFormat.format).toBe('day_first');
    expect(log.sensors.map((s) => s.sensorKey).sort()).toEqual([r1!.code, r2!.code].sort());
    expect(problem(log, 'duplicate')).toBe(2);
    expect(log.sensors.every((s) => s.readings === 2 * 144)).toBe(true);
    await commit(estates, log.id, 'cancel');
  });

  it('reads one room per .xlsx file with title lines, Excel date cells and extra columns', async () => {
    const room = schoolA.rooms[2]!;
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Export');
    ws.addRow(['Device name:', 'CO2 monitor 17']);
    ws.addRow([`Location: ${room.code}`]);
    ws.addRow([]);
    ws.addRow(['Date', 'Time', 'CO2 ppm', 'Temp °C', 'RH %', 'Battery %']);
    for (let m = 0; m < 1440; m += 15) {
      const day = new Date(Date.UTC(2026, 2, 2));
      ws.addRow([
        day,
        `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`,
        450 + (m % 300),
        20.5,
        41,
        88,
      ]);
    }
    const bytes = Buffer.from(await wb.xlsx.writeBuffer());
    const log = await preview(estates, 'monitor-17.xlsx', bytes);
    expect(log.layout.kind).toBe('single');
    expect(log.sensors).toHaveLength(1);
    expect(log.sensors[0]).toMatchObject({ sensorKey: room.code, match: 'room_code', roomId: room.id, readings: 96 });
    expect(log.sensors[0]!.extras.map((e) => e.kind).sort()).toEqual(['humidity', 'other', 'temperature']);
    await commit(estates, log.id, 'cancel');
  });

  it('reads UK local time across the October clock change (the repeated hour) and UTC logs straight through it', async () => {
    const room = schoolA.rooms[3]!;
    // Local logger: 00:00–01:55 BST, then 01:00–01:55 again in GMT, then on.
    const local = ['Timestamp,Room,CO2'];
    for (let m = 0; m < 120; m += 5) local.push(`${isoText('2026-10-25', m)},${room.code},${500 + m}`);
    for (let m = 60; m < 300; m += 5) local.push(`${isoText('2026-10-25', m)},${room.code},${700 + m}`);
    const l = await preview(estates, 'local.csv', `${local.join('\n')}\n`);
    expect(l.timeBasis).toBe('Europe/London');
    expect(problem(l, 'duplicate') + problem(l, 'conflicting_duplicate')).toBe(0);
    expect(l.sensors[0]!.readings).toBe(24 + 48);
    await commit(estates, l.id, 'cancel');

    const utc = ['Timestamp,Room,CO2'];
    for (let m = 0; m < 300; m += 5) utc.push(`${isoText('2026-10-25', m)},${room.code},${500 + m}`);
    const u = await preview(estates, 'utc.csv', `${utc.join('\n')}\n`);
    expect(u.timeBasis).toBe('UTC');
    expect(u.sensors[0]!.readings).toBe(60);
    await commit(estates, u.id, 'cancel');
  });

  it('reports local times inside the March gap when told the file is UK local time', async () => {
    const room = schoolA.rooms[3]!;
    const rows = ['Timestamp,Room,CO2'];
    for (let m = 0; m < 180; m += 10) rows.push(`${dayFirst('2026-03-29', m)},${room.code},${600 + m}`);
    const log = await preview(estates, 'spring.csv', `${rows.join('\n')}\n`, '&timeBasis=Europe/London');
    expect(problem(log, 'clock_change_gap')).toBe(6);
    expect(log.sensors[0]!.readings).toBe(12);
    await commit(estates, log.id, 'cancel');
  });

  it('reports a flat-lined sensor and a gap, and keeps their readings out or unfilled', async () => {
    const room = schoolA.rooms[3]!;
    const rows = ['Timestamp,Room,CO2'];
    // 00:00–05:00 varying, 05:00–10:00 stuck at 612 ppm, nothing 10:00–12:00, then varying again.
    for (let m = 0; m < 300; m += 5) rows.push(`${isoText('2026-01-12', m)},${room.code},${600 + (m % 97)}`);
    for (let m = 300; m < 600; m += 5) rows.push(`${isoText('2026-01-12', m)},${room.code},612`);
    for (let m = 720; m < 1440; m += 5) rows.push(`${isoText('2026-01-12', m)},${room.code},${600 + (m % 97)}`);
    const log = await preview(estates, 'stuck.csv', `${rows.join('\n')}\n`);
    expect(problem(log, 'flat_line')).toBe(60);
    expect(problem(log, 'gap')).toBe(1);
    expect(log.sensors[0]!.readings).toBe(60 + 144);
    await commit(estates, log.id, 'cancel');
  });
});

describe('hostile and broken files', () => {
  it.each([
    ['binary data named .csv', 'log.csv', Buffer.from([0x50, 0x4b, 0x03, 0x04, 0, 0, 0, 0, 1, 2, 3])],
    ['a workbook cut short', 'log.xlsx', Buffer.from('PK\u0003\u0004 this zip has no end')],
    ['plain text named .xlsx', 'log.xlsx', Buffer.from('Timestamp,Room,CO2\n')],
    ['an empty file', 'log.csv', Buffer.alloc(0)],
    ['a file with no header', 'log.csv', Buffer.from('1,2,3\n4,5,6\n')],
    ['a header with no usable reading', 'log.csv', Buffer.from('Timestamp,Room,CO2\n2026-01-05 09:00,G1,abc\n')],
    ['a program named .exe', 'log.exe', Buffer.from('MZ')],
  ])('refuses %s with a clear 400 and stores nothing', async (_what, name, bytes) => {
    const [logs, days, audit] = await Promise.all([
      countRows('monitor_logs'),
      countRows('monitor_log_days'),
      countRows('audit_events'),
    ]);
    const response = await upload(estates, name, bytes);
    expect(response.status).toBe(400);
    const body = (await response.json()) as { error: { message: string } };
    expect(body.error.message.length).toBeGreaterThan(20);
    expect([
      await countRows('monitor_logs'),
      await countRows('monitor_log_days'),
      await countRows('audit_events'),
    ]).toEqual([logs, days, audit]);
  });

  it('refuses a zip bomb inside a workbook with the register guard', async () => {
    // A worksheet of 300 MB of spaces deflates to a few hundred kB: past the guard's 256 MB part limit.
    const { deflateRawSync } = await import('node:zlib');
    const payload = deflateRawSync(Buffer.alloc(300 * 1024 * 1024, 32), { level: 9 });
    const entry = (name: string, data: Buffer, method: number, size: number) => ({
      name: Buffer.from(name),
      data,
      method,
      size,
    });
    const entries = [
      entry('xl/workbook.xml', Buffer.from('<workbook/>'), 0, 11),
      entry('xl/worksheets/sheet1.xml', payload, 8, 300 * 1024 * 1024),
    ];
    const parts: Buffer[] = [];
    const central: Buffer[] = [];
    let offset = 0;
    for (const e of entries) {
      const local = Buffer.alloc(30);
      local.writeUInt32LE(0x04034b50, 0);
      local.writeUInt16LE(e.method, 8);
      local.writeUInt32LE(e.data.length, 18);
      local.writeUInt32LE(e.size, 22);
      local.writeUInt16LE(e.name.length, 26);
      parts.push(local, e.name, e.data);
      const c = Buffer.alloc(46);
      c.writeUInt32LE(0x02014b50, 0);
      c.writeUInt16LE(e.method, 10);
      c.writeUInt32LE(e.data.length, 20);
      c.writeUInt32LE(e.size, 24);
      c.writeUInt16LE(e.name.length, 28);
      c.writeUInt32LE(offset, 42);
      central.push(c, e.name);
      offset += 30 + e.name.length + e.data.length;
    }
    const dir = Buffer.concat(central);
    const end = Buffer.alloc(22);
    end.writeUInt32LE(0x06054b50, 0);
    end.writeUInt16LE(entries.length, 8);
    end.writeUInt16LE(entries.length, 10);
    end.writeUInt32LE(dir.length, 12);
    end.writeUInt32LE(offset, 16);
    const logs = await countRows('monitor_logs');
    const response = await upload(estates, 'bomb.xlsx', Buffer.concat([...parts, dir, end]));
    expect(response.status).toBe(400);
    expect(((await response.json()) as { error: { message: string } }).error.message).toContain('zip bomb');
    expect(await countRows('monitor_logs')).toBe(logs);
  });
});

describe('reading workbooks off the request thread', () => {
  it('keeps answering other requests while a large .xlsx log is unpacked and read', async () => {
    // Three sensors at 5-minute steps for 25 weeks: 151,200 rows, about 5 MB zipped and ten times that
    // unpacked. Read in the request thread, unpacking and parsing it held every other request for seconds.
    const wb = new ExcelJS.Workbook();
    const ws = wb.addWorksheet('Readings');
    ws.addRow(['Timestamp', 'Sensor', 'CO2 ppm', 'Temperature C']);
    const start = Date.UTC(2026, 0, 5);
    for (let step = 0; step < 50_400; step++)
      for (const sensor of ['Unknown A', 'Unknown B', 'Unknown C'])
        ws.addRow([new Date(start + step * 300_000), sensor, 420 + (step % 400), 20]);
    const bytes = Buffer.from(await wb.xlsx.writeBuffer());
    let uploading = true;
    let longestWaitMs = 0;
    const probe = (async () => {
      while (uploading) {
        const started = performance.now();
        expect((await api('/api/health')).status).toBe(200);
        longestWaitMs = Math.max(longestWaitMs, performance.now() - started);
      }
    })();
    const started = performance.now();
    const response = await upload(estates, 'half a year.xlsx', bytes);
    const uploadMs = performance.now() - started;
    uploading = false;
    await probe;
    const text = await response.text();
    expect(response.status, text).toBe(201);
    const log = JSON.parse(text) as Log;
    expect(log.sensors.map((s) => s.readings)).toEqual([50_400, 50_400, 50_400]);
    expect(uploadMs).toBeGreaterThan(1000);
    // Read in the request thread, one health check waited for most of the upload (the unpacking and parsing). Off
    // it, the longest wait is a small part of the upload, however loaded the machine (an absolute 750 ms limit failed
    // once at 855 ms on a busy machine).
    expect(longestWaitMs).toBeLessThan(uploadMs / 4);
    await commit(estates, log.id, 'cancel');
  }, 180_000);
});

describe('mapping, remembering, deleting and calibrating', () => {
  it('remembers a room chosen for a sensor and matches it next time', async () => {
    const room = schoolB.rooms[2]!;
    const csv = longCsv(['Sensor 0042'], dates('2026-01-19', 1), 15);
    const first = await preview(estates, 'first.csv', csv);
    expect(first.sensors[0]!.match).toBe('unmatched');
    const mapped = await api(`/api/monitor-logs/${first.id}/sensors`, {
      method: 'PATCH',
      cookie: estates,
      body: JSON.stringify({ sensors: [{ sensorId: first.sensors[0]!.id, roomId: room.id }] }),
    });
    expect(mapped.status).toBe(200);
    await commit(estates, first.id);
    const second = await preview(estates, 'second.csv', longCsv(['SENSOR-0042'], dates('2026-01-20', 1), 15));
    expect(second.sensors[0]).toMatchObject({ match: 'remembered', roomId: room.id });
    await commit(estates, second.id, 'cancel');
    const viewerMap = await api(`/api/monitor-logs/${first.id}/sensors`, {
      method: 'PATCH',
      cookie: viewer,
      body: JSON.stringify({ sensors: [{ sensorId: first.sensors[0]!.id, roomId: null }] }),
    });
    expect(viewerMap.status).toBe(403);
  });

  it('deletes exactly one log’s readings when two logs cover the same room', async () => {
    const room = schoolB.rooms[3]!;
    const a = await preview(estates, 'a.csv', longCsv([room.code], dates('2026-01-26', 2), 15));
    await commit(estates, a.id);
    const b = await preview(estates, 'b.csv', longCsv([room.code], dates('2026-01-27', 2), 15));
    await commit(estates, b.id);
    await analysed(estates);
    const daysOf = async (logId: string) =>
      Number(
        (
          await sql<{
            n: number;
          }>`SELECT count(*)::int AS n FROM monitor_log_days d JOIN monitor_log_sensors s ON s.id = d.sensor_id WHERE s.log_id = ${logId}::uuid`.execute(
            db,
          )
        ).rows[0]!.n,
      );
    expect([await daysOf(a.id), await daysOf(b.id)]).toEqual([2, 2]);
    const viewerDelete = await api(`/api/monitor-logs/${a.id}`, { method: 'DELETE', cookie: viewer });
    expect(viewerDelete.status).toBe(403);
    const response = await api(`/api/monitor-logs/${a.id}`, { method: 'DELETE', cookie: estates });
    expect(response.status).toBe(200);
    expect([await daysOf(a.id), await daysOf(b.id)]).toEqual([0, 2]);
    await analysed(estates);
    const left = await db
      .selectFrom('monitor_room_days')
      .select('day')
      .where('room_id', '=', room.id)
      .orderBy('day')
      .execute();
    expect(left.map((d) => String(d.day))).toHaveLength(2);
    const audit = await db.selectFrom('audit_events').select('action').where('entity_id', '=', a.id).execute();
    expect(audit.map((x) => x.action).sort()).toEqual([
      'monitor_log.committed',
      'monitor_log.deleted',
      'monitor_log.previewed',
    ]);
  });

  it('calibrates a room from its readings, says so, and reverts', async () => {
    const room = schoolA.rooms[0]!;
    const log = await preview(estates, 'calibration.csv', longCsv([room.code], dates('2026-01-12', 12), 5));
    await commit(estates, log.id);
    await analysed(estates);
    const viewerTry = await api(`/api/rooms/${room.id}/calibration`, { method: 'POST', cookie: viewer });
    expect(viewerTry.status).toBe(403);
    const response = await api(`/api/rooms/${room.id}/calibration`, { method: 'POST', cookie: estates });
    const text = await response.text();
    expect(response.status, text).toBe(201);
    const { version } = JSON.parse(text) as {
      version: {
        label: string;
        daysUsed: number;
        fit: { seasons: { winter: { measuredRisePpm: number; modelRiseAfterPpm: number; limit: string } } };
      };
    };
    expect(version.label).toMatch(/^calibrated from \d+ days of readings/);
    const w = version.fit.seasons.winter;
    if (w.limit === 'none') expect(Math.abs(w.modelRiseAfterPpm - w.measuredRisePpm)).toBeLessThan(5);
    const view = (await (await api(`/api/measured/rooms/${room.id}`, { cookie: viewer })).json()) as {
      calibrationLabel: string | null;
      evidence: { kind: string };
    };
    expect(view.calibrationLabel).toBe(version.label);
    expect(view.evidence.kind).toBe('measured');
    const revert = await api(`/api/rooms/${room.id}/calibration`, { method: 'DELETE', cookie: admin });
    expect(revert.status).toBe(204);
    const after = (await (await api(`/api/measured/rooms/${room.id}`, { cookie: viewer })).json()) as {
      calibrationLabel: string | null;
    };
    expect(after.calibrationLabel).toBeNull();
    const audit = await db
      .selectFrom('audit_events')
      .select('action')
      .where('entity_id', '=', room.id)
      .where('action', 'like', 'room.calib%')
      .execute();
    expect(audit.map((a) => a.action).sort()).toEqual(['room.calibrated', 'room.calibration_reverted']);
  });
});

describe('a school-limited estates manager', () => {
  let limited: string;
  beforeAll(async () => {
    const email = uniqueEmail('limited-estates');
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email, role: 'estates_manager', schoolIds: [schoolA.id] }),
    });
    const { invitation } = (await invite.json()) as { invitation: { id: string } };
    limited = await signUp({ name: 'Limited Estates', email, password: DEMO_PASSWORD, invitationId: invitation.id });
  });

  it('does not see, change or delete another school’s log, and matches sensors only in its own schools', async () => {
    const other = await preview(admin, 'school-b.csv', longCsv([schoolB.rooms[0]!.code], dates('2026-03-02', 1), 30));
    await commit(admin, other.id);
    const list = (await (await api('/api/monitor-logs', { cookie: limited })).json()) as { logs: { id: string }[] };
    expect(list.logs.map((l) => l.id)).not.toContain(other.id);
    expect((await api(`/api/monitor-logs/${other.id}`, { cookie: limited })).status).toBe(404);
    expect((await api(`/api/monitor-logs/${other.id}`, { method: 'DELETE', cookie: limited })).status).toBe(404);
    expect((await api(`/api/measured/rooms/${schoolB.rooms[0]!.id}`, { cookie: limited })).status).toBe(404);
    const comparison = (await (await api('/api/measured/comparison', { cookie: limited })).json()) as {
      rows: { roomId: string }[];
    };
    expect(comparison.rows.map((r) => r.roomId)).not.toContain(schoolB.rooms[0]!.id);

    const mine = await preview(
      limited,
      'mixed.csv',
      longCsv([schoolA.rooms[1]!.code, schoolB.rooms[1]!.code], dates('2026-03-03', 1), 30),
    );
    const byKey = new Map(mine.sensors.map((s) => [s.sensorKey, s]));
    expect(byKey.get(schoolA.rooms[1]!.code)?.match).toBe('room_code');
    expect(byKey.get(schoolB.rooms[1]!.code)).toMatchObject({ match: 'unmatched', roomId: null });
    const sneak = await api(`/api/monitor-logs/${mine.id}/sensors`, {
      method: 'PATCH',
      cookie: limited,
      body: JSON.stringify({
        sensors: [{ sensorId: byKey.get(schoolB.rooms[1]!.code)!.id, roomId: schoolB.rooms[1]!.id }],
      }),
    });
    expect(sneak.status).toBe(404);
    await commit(limited, mine.id, 'cancel');
  });
});
