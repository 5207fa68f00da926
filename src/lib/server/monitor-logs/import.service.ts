/**
 * Importing a monitor log: preview (read and clean the whole file, match sensors to rooms, store the readings
 * under the preview, used by nothing yet), map sensors, then commit (the readings count from then on, in one
 * transaction) or cancel. Committed logs can be deleted, which removes exactly their readings.
 */
import type { Readable } from 'node:stream';
import { sql, type Kysely } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { copyLines, copyPieces } from '../db/copy';
import { withConnection } from '../db/client';
import { badRequest, conflict, notFound } from '../http/errors';
import type { SheetRow } from '../register/reader';
import { requestAnalysis } from './analysis.service';
import { LogCollector } from './collect';
import { detectLayout, type Layout } from './layout';
import { getLog, rememberedMappings, rememberMappings, roomsInScope, type LogView } from './logs.repository';
import { indexRooms, matchSensor, normalKey } from './match';
import { noReadings, otherSchoolsInLog } from './monitor-logs.errors';
import { DAY_COPY_SQL, dayCopyLine } from './packing';
import { decideBasis, prepareSensor, type PreparedSensor } from './prepare';
import { PROBLEM_TEXT, type ProblemTally } from './problems';
import { logKindOf, logRowBatches } from './reader';
import type { TimeBasis } from './timestamps';

type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** An upload as the route hands it over: the file's name and its bytes as a stream. */
export interface LogUpload {
  fileName: string;
  stream: Readable;
}

/** Choices made with the upload. */
export interface LogOptions {
  timeBasis: TimeBasis | null;
  schoolId: string | null;
}

/** Previews not committed within this long are removed when the trust uploads again. */
const PREVIEW_LIFETIME_HOURS = 24;

/** Reads the whole file: layout from its first rows, then every row into the collector. */
async function collect(
  batches: AsyncIterable<SheetRow[]>,
  fileName: string,
): Promise<{ layout: Layout; collector: LogCollector }> {
  const head: SheetRow[] = [];
  let collector: LogCollector | null = null;
  const start = () => {
    const layout = detectLayout(
      head.map((r) => r.values),
      fileName,
    );
    const c = new LogCollector(layout);
    for (const r of head.slice(layout.headerRow)) c.add(r.rowNumber, r.values);
    return c;
  };
  for await (const batch of batches) {
    for (const row of batch) {
      if (collector) collector.add(row.rowNumber, row.values);
      else {
        head.push(row);
        if (head.length >= 40) collector = start();
      }
    }
  }
  if (!collector) {
    if (head.length === 0) throw badRequest('The file is empty. Choose the log file again.');
    collector = start();
  }
  return { layout: collector.layout, collector };
}

/** Problems of the whole file: its own plus every sensor's, summed by kind, with a plain label. */
function fileProblems(
  own: ProblemTally[],
  sensors: PreparedSensor[],
): (ProblemTally & { label: string; leftOut: boolean })[] {
  const byKind = new Map<string, ProblemTally>();
  for (const t of [...own, ...sensors.flatMap((s) => s.problems.list())]) {
    const hit = byKind.get(t.kind);
    if (hit) {
      hit.count += t.count;
      for (const e of t.examples) if (hit.examples.length < 5) hit.examples.push(e);
    } else byKind.set(t.kind, { kind: t.kind, count: t.count, examples: [...t.examples] });
  }
  return [...byKind.values()].map((t) => ({ ...t, ...PROBLEM_TEXT[t.kind] }));
}

/**
 * Reads, checks and stores a log for preview. A file that cannot be read, or gives no usable reading, is
 * refused with a 400 and nothing is stored. `onRows` reports progress (rows read so far).
 */
export async function previewLog(
  pool: pg.Pool,
  trust: ActiveTrust,
  actor: Actor,
  upload: LogUpload,
  options: LogOptions,
  onBytes?: (bytes: number) => void,
): Promise<LogView> {
  const kind = logKindOf(upload.fileName);
  let sizeBytes = 0;
  const rows = logRowBatches(kind, upload.stream, (n) => {
    sizeBytes = n;
    onBytes?.(n);
  });
  const { layout, collector } = await collect(rows, upload.fileName);
  const basis = decideBasis(collector, options.timeBasis);
  const sensors: PreparedSensor[] = [];
  for (const [key, buffer] of collector.sensors) {
    sensors.push(prepareSensor(buffer, basis.basis));
    collector.sensors.delete(key);
  }
  const problems = fileProblems(collector.problems.list(), sensors);
  const readings = sensors.reduce((sum, s) => sum + s.readings, 0);
  if (readings === 0) throw noReadings(problems);

  return withConnection(pool, async (db, client) => {
    if (options.schoolId && trust.schoolIds && !trust.schoolIds.includes(options.schoolId))
      throw notFound('That school');
    const rooms = await roomsInScope(db, trust, options.schoolId);
    if (options.schoolId && rooms.length === 0) {
      const school = await db
        .selectFrom('schools')
        .select('id')
        .where('id', '=', options.schoolId)
        .where('trust_id', '=', trust.id)
        .executeTakeFirst();
      if (!school) throw notFound('That school');
    }
    const byCode = indexRooms(rooms);
    const scope = new Set(rooms.map((r) => r.id));
    const remembered = await rememberedMappings(db, trust.id);
    const firstAt =
      sensors
        .map((s) => s.firstAt)
        .filter(Boolean)
        .sort()[0] ?? null;
    const lastAt =
      sensors
        .map((s) => s.lastAt)
        .filter(Boolean)
        .sort()
        .pop() ?? null;
    const extrasMeta = new Map(layout.extras.map((e) => [e.key, { key: e.key, label: e.label, kind: e.kind }]));
    return db.transaction().execute(async (trx) => {
      await sql`DELETE FROM monitor_logs WHERE trust_id = ${trust.id} AND status = 'previewed'
        AND created_at < now() - make_interval(hours => ${PREVIEW_LIFETIME_HOURS})`.execute(trx);
      const log = await trx
        .insertInto('monitor_logs')
        .values({
          trust_id: trust.id,
          created_by_user_id: actor.actorUserId,
          created_by_email: actor.actorEmail,
          file_name: upload.fileName.slice(0, 255),
          file_kind: kind,
          file_size_bytes: sizeBytes,
          layout: JSON.stringify({ ...layout, basisReason: basis.reason, rows: collector.rows }),
          time_basis: basis.basis,
          reading_count: readings,
          first_at: firstAt,
          last_at: lastAt,
          problems: JSON.stringify(problems),
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      const sensorRows = await trx
        .insertInto('monitor_log_sensors')
        .values(
          sensors.map((s) => {
            const m = matchSensor(s.key, byCode, remembered, scope);
            return {
              log_id: log.id,
              trust_id: trust.id,
              sensor_key: s.key,
              room_id: m.roomId,
              match: m.match,
              candidates: JSON.stringify(m.candidates),
              reading_count: s.readings,
              day_count: s.days.length,
              first_at: s.firstAt,
              last_at: s.lastAt,
              interval_seconds: s.intervalSeconds,
              extras: JSON.stringify(s.extraKeys.map((k) => extrasMeta.get(k) ?? { key: k, label: k, kind: 'other' })),
              problems: JSON.stringify(s.problems.list()),
            };
          }),
        )
        .returning(['id', 'sensor_key'])
        .execute();
      const idOf = new Map(sensorRows.map((r) => [r.sensor_key, r.id]));
      await copyLines(
        client,
        DAY_COPY_SQL,
        copyPieces(
          sensors.flatMap((s) => s.days.map((d) => ({ id: idOf.get(s.key) as string, d }))),
          ({ id, d }) => dayCopyLine(id, d),
        ),
      );
      await recordAudit(trx, {
        trustId: trust.id,
        ...actor,
        action: 'monitor_log.previewed',
        entityType: 'monitor_log',
        entityId: log.id,
        summary: `Uploaded ${upload.fileName} for preview: ${readings} readings from ${sensors.length} sensors`,
      });
      return getLog(trx, trust, actor.actorUserId, log.id);
    });
  });
}

/**
 * Locks a log for a write. A school-limited member must be able to see it (they uploaded it, or it covers one
 * of their schools: 404 otherwise) and may change it only when it covers no other school's rooms (403).
 */
async function lockLog(trx: Kysely<Database>, trust: ActiveTrust, actor: Actor, id: string) {
  const log = await trx
    .selectFrom('monitor_logs')
    .select(['id', 'status', 'file_name', 'created_by_user_id'])
    .where('id', '=', id)
    .where('trust_id', '=', trust.id)
    .forUpdate()
    .executeTakeFirst();
  if (!log || log.status === 'cancelled') throw notFound('That monitor log');
  if (trust.schoolIds) {
    const schools = await trx
      .selectFrom('monitor_log_sensors as s')
      .innerJoin('rooms as r', 'r.id', 's.room_id')
      .select('r.school_id')
      .distinct()
      .where('s.log_id', '=', id)
      .execute();
    const mine = schools.filter((s) => trust.schoolIds?.includes(s.school_id));
    const uploader = log.created_by_user_id !== null && log.created_by_user_id === actor.actorUserId;
    if (!uploader && mine.length === 0) throw notFound('That monitor log');
    if (mine.length < schools.length) throw otherSchoolsInLog();
  }
  return log;
}

/** Rooms whose readings a log holds (for re-analysis). */
async function roomsOfLog(trx: Kysely<Database>, id: string): Promise<string[]> {
  const rows = await trx
    .selectFrom('monitor_log_sensors')
    .select('room_id')
    .distinct()
    .where('log_id', '=', id)
    .where('room_id', 'is not', null)
    .execute();
  return rows.map((r) => r.room_id as string);
}

/** Sets (or, with null, skips) the room of some of a log's sensors; a committed log's readings follow. */
export async function mapSensors(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  changes: { sensorId: string; roomId: string | null }[],
): Promise<LogView> {
  const touched = await db.transaction().execute(async (trx) => {
    const log = await lockLog(trx, trust, actor, id);
    if (log.status === 'deleted') throw conflict('This log has been deleted; upload it again to use its readings.');
    const rooms = await roomsInScope(trx, trust, null);
    const scope = new Map(rooms.map((r) => [r.id, r]));
    const before = await roomsOfLog(trx, id);
    const lines: string[] = [];
    const remember: { sensorKey: string; roomId: string }[] = [];
    for (const change of changes) {
      const sensor = await trx
        .selectFrom('monitor_log_sensors')
        .select(['id', 'sensor_key'])
        .where('id', '=', change.sensorId)
        .where('log_id', '=', id)
        .executeTakeFirst();
      if (!sensor) throw notFound('That sensor of the log');
      if (change.roomId !== null && !scope.has(change.roomId)) throw notFound('That room');
      await trx
        .updateTable('monitor_log_sensors')
        .set({ room_id: change.roomId, match: change.roomId === null ? 'skipped' : 'chosen' })
        .where('id', '=', sensor.id)
        .execute();
      const room = change.roomId ? scope.get(change.roomId) : null;
      lines.push(`${sensor.sensor_key} → ${room ? `${room.schoolName} ${room.code}` : 'left out'}`);
      if (change.roomId && log.status === 'committed')
        remember.push({ sensorKey: sensor.sensor_key, roomId: change.roomId });
    }
    await rememberMappings(trx, trust.id, remember, actor.actorEmail);
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'monitor_log.mapped',
      entityType: 'monitor_log',
      entityId: id,
      summary: `Matched sensors of ${log.file_name}: ${lines.join('; ')}`,
      after: changes,
    });
    return log.status === 'committed' ? [...new Set([...before, ...(await roomsOfLog(trx, id))])] : [];
  });
  if (touched.length > 0) await requestAnalysis(db, trust.id, touched, actor.actorEmail);
  return getLog(db, trust, actor.actorUserId, id);
}

/** What a commit or cancel did. */
export interface LogOutcome {
  status: 'committed' | 'cancelled';
  sensorsImported: number;
  readingsImported: number;
  sensorsLeftOut: number;
  readingsLeftOut: number;
  rooms: number;
}

/** Commits a previewed log in one transaction (sensors without a room are left out), or cancels it. */
export async function commitLog(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  action: 'commit' | 'cancel',
  options: { queueAnalysis?: boolean } = {},
): Promise<{ outcome: LogOutcome; analysisRunId: string | null }> {
  const result = await db.transaction().execute(async (trx) => {
    const log = await lockLog(trx, trust, actor, id);
    if (log.status !== 'previewed')
      throw conflict(`This log is already ${log.status}; upload the file again to import it.`);
    const sensors = await trx
      .selectFrom('monitor_log_sensors')
      .select(['id', 'sensor_key', 'room_id', 'reading_count'])
      .where('log_id', '=', id)
      .execute();
    const audit = { trustId: trust.id, ...actor, entityType: 'monitor_log', entityId: id };
    if (action === 'cancel') {
      await trx.deleteFrom('monitor_log_sensors').where('log_id', '=', id).execute();
      const outcome: LogOutcome = {
        status: 'cancelled',
        sensorsImported: 0,
        readingsImported: 0,
        sensorsLeftOut: sensors.length,
        readingsLeftOut: sensors.reduce((s, x) => s + x.reading_count, 0),
        rooms: 0,
      };
      await trx
        .updateTable('monitor_logs')
        .set({ status: 'cancelled', outcome: JSON.stringify(outcome) })
        .where('id', '=', id)
        .execute();
      await recordAudit(trx, {
        ...audit,
        action: 'monitor_log.cancelled',
        summary: `Cancelled the import of ${log.file_name}; nothing was stored`,
      });
      return { outcome, rooms: [] as string[] };
    }
    const kept = sensors.filter((s) => s.room_id !== null);
    const left = sensors.filter((s) => s.room_id === null);
    if (kept.length === 0)
      throw badRequest('No sensor of this log is matched to a room. Choose a room for at least one sensor, or cancel.');
    if (left.length > 0)
      await trx
        .deleteFrom('monitor_log_days')
        .where(
          'sensor_id',
          'in',
          left.map((s) => s.id),
        )
        .execute();
    await rememberMappings(
      trx,
      trust.id,
      kept.map((s) => ({ sensorKey: s.sensor_key, roomId: s.room_id as string })),
      actor.actorEmail,
    );
    const rooms = [...new Set(kept.map((s) => s.room_id as string))];
    const outcome: LogOutcome = {
      status: 'committed',
      sensorsImported: kept.length,
      readingsImported: kept.reduce((s, x) => s + x.reading_count, 0),
      sensorsLeftOut: left.length,
      readingsLeftOut: left.reduce((s, x) => s + x.reading_count, 0),
      rooms: rooms.length,
    };
    await trx
      .updateTable('monitor_logs')
      .set({
        status: 'committed',
        outcome: JSON.stringify(outcome),
        committed_at: sql<Date>`now()`,
        committed_by_email: actor.actorEmail,
      })
      .where('id', '=', id)
      .execute();
    await recordAudit(trx, {
      ...audit,
      action: 'monitor_log.committed',
      summary: `Imported ${log.file_name}: ${outcome.readingsImported} readings for ${outcome.rooms} rooms; ${outcome.sensorsLeftOut} sensors left out`,
      after: outcome,
    });
    return { outcome, rooms };
  });
  // The benchmark times the import alone and runs the analysis itself (queueAnalysis: false).
  const analysisRunId =
    result.rooms.length > 0 && options.queueAnalysis !== false
      ? await requestAnalysis(db, trust.id, result.rooms, actor.actorEmail)
      : null;
  return { outcome: result.outcome, analysisRunId };
}

/** Deletes a log's readings (exactly those) and keeps its row for the history. */
export async function deleteLog(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
): Promise<{ analysisRunId: string | null }> {
  const rooms = await db.transaction().execute(async (trx) => {
    const log = await lockLog(trx, trust, actor, id);
    if (log.status === 'deleted') throw conflict('This log is already deleted.');
    const touched = log.status === 'committed' ? await roomsOfLog(trx, id) : [];
    const removed = await sql<{ n: number }>`
      WITH gone AS (DELETE FROM monitor_log_days d USING monitor_log_sensors s
        WHERE s.id = d.sensor_id AND s.log_id = ${id}::uuid RETURNING d.reading_count)
      SELECT coalesce(sum(reading_count), 0)::int AS n FROM gone`.execute(trx);
    await trx
      .updateTable('monitor_logs')
      .set({ status: 'deleted', deleted_at: sql<Date>`now()`, deleted_by_email: actor.actorEmail })
      .where('id', '=', id)
      .execute();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'monitor_log.deleted',
      entityType: 'monitor_log',
      entityId: id,
      summary: `Deleted ${log.file_name} and its ${removed.rows[0]?.n ?? 0} readings`,
    });
    return touched;
  });
  return { analysisRunId: rooms.length > 0 ? await requestAnalysis(db, trust.id, rooms, actor.actorEmail) : null };
}

export { normalKey };
