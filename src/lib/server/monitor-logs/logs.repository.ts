/** Queries of the monitor-log feature: rooms a member may match, remembered mappings, and the log views. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import { notFound } from '../http/errors';
import { normalKey, type RoomRef } from './match';
import type { ProblemTally } from './problems';

/** Rooms of the trust the member may see (and, when given, of one school only). */
export async function roomsInScope(
  db: Kysely<Database>,
  trust: ActiveTrust,
  schoolId: string | null,
): Promise<RoomRef[]> {
  let q = db
    .selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .select([
      'rooms.id',
      'rooms.code',
      'schools.id as school_id',
      'schools.name as school_name',
      'schools.reference_number',
    ])
    .where('schools.trust_id', '=', trust.id);
  if (trust.schoolIds)
    q = q.where(
      'schools.id',
      'in',
      trust.schoolIds.length > 0 ? trust.schoolIds : ['00000000-0000-0000-0000-000000000000'],
    );
  if (schoolId) q = q.where('schools.id', '=', schoolId);
  const rows = await q.execute();
  return rows.map((r) => ({
    id: r.id,
    code: r.code,
    schoolId: r.school_id,
    schoolName: r.school_name,
    schoolReference: r.reference_number,
  }));
}

/** The trust's remembered sensor → room mappings, by normalised sensor name. */
export async function rememberedMappings(db: Kysely<Database>, trustId: string): Promise<Map<string, string>> {
  const rows = await db
    .selectFrom('monitor_sensor_mappings')
    .select(['sensor_key', 'room_id'])
    .where('trust_id', '=', trustId)
    .execute();
  return new Map(rows.map((r) => [r.sensor_key, r.room_id]));
}

/** Saves sensor → room mappings for the trust (the newest choice wins). */
export async function rememberMappings(
  db: Kysely<Database>,
  trustId: string,
  pairs: { sensorKey: string; roomId: string }[],
  email: string | null,
): Promise<void> {
  const unique = new Map(pairs.map((p) => [normalKey(p.sensorKey), p.roomId]));
  if (unique.size === 0) return;
  await db
    .insertInto('monitor_sensor_mappings')
    .values(
      [...unique].map(([sensor_key, room_id]) => ({ trust_id: trustId, sensor_key, room_id, updated_by_email: email })),
    )
    .onConflict((oc) =>
      oc.columns(['trust_id', 'sensor_key']).doUpdateSet((eb) => ({
        room_id: eb.ref('excluded.room_id'),
        updated_by_email: eb.ref('excluded.updated_by_email'),
        updated_at: sql<Date>`now()`,
      })),
    )
    .execute();
}

/** One sensor of a log as the preview and history show it. */
export interface LogSensorView {
  id: string;
  sensorKey: string;
  match: string;
  roomId: string | null;
  roomCode: string | null;
  schoolName: string | null;
  candidates: { roomId: string; code: string; schoolId: string; schoolName: string }[];
  readings: number;
  days: number;
  firstAt: string | null;
  lastAt: string | null;
  intervalSeconds: number | null;
  extras: { key: string; label: string; kind: string }[];
  problems: ProblemTally[];
}

/** A log as the API answers it. */
export interface LogView {
  id: string;
  fileName: string;
  fileKind: string;
  fileSizeBytes: number;
  status: string;
  layout: unknown;
  timeBasis: string;
  readings: number;
  firstAt: string | null;
  lastAt: string | null;
  problems: ProblemTally[];
  outcome: unknown;
  createdAt: string;
  createdByEmail: string | null;
  committedAt: string | null;
  deletedAt: string | null;
  sensors: LogSensorView[];
  /** Sensors hidden from a school-limited member (rooms in other schools). */
  hiddenSensors: number;
}

const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString());

/** Where a school-limited member may see a log: they uploaded it, or a sensor's room is in their schools. */
function visibleSql(trust: ActiveTrust, userId: string | null) {
  if (!trust.schoolIds) return sql<boolean>`TRUE`;
  return sql<boolean>`(l.created_by_user_id = ${userId ?? ''} OR EXISTS (
    SELECT 1 FROM monitor_log_sensors s JOIN rooms r ON r.id = s.room_id
    WHERE s.log_id = l.id AND r.school_id = ANY(${trust.schoolIds}::uuid[])))`;
}

/** The trust's logs the member may see, newest first (without their sensors). */
export async function listLogs(db: Kysely<Database>, trust: ActiveTrust, userId: string | null, limit = 100) {
  const { rows } = await sql<{
    id: string;
    file_name: string;
    file_kind: string;
    status: string;
    reading_count: number;
    first_at: Date | null;
    last_at: Date | null;
    created_at: Date;
    created_by_email: string | null;
    committed_at: Date | null;
    sensors: number;
    rooms: number;
  }>`
    SELECT l.id, l.file_name, l.file_kind, l.status, l.reading_count, l.first_at, l.last_at, l.created_at,
      l.created_by_email, l.committed_at,
      (SELECT count(*)::int FROM monitor_log_sensors s WHERE s.log_id = l.id) AS sensors,
      (SELECT count(DISTINCT s.room_id)::int FROM monitor_log_sensors s WHERE s.log_id = l.id AND s.room_id IS NOT NULL) AS rooms
    FROM monitor_logs l
    WHERE l.trust_id = ${trust.id} AND l.status IN ('previewed', 'committed', 'deleted') AND ${visibleSql(trust, userId)}
    ORDER BY l.created_at DESC LIMIT ${limit}`.execute(db);
  return rows.map((r) => ({
    id: r.id,
    fileName: r.file_name,
    fileKind: r.file_kind,
    status: r.status,
    readings: r.reading_count,
    firstAt: iso(r.first_at),
    lastAt: iso(r.last_at),
    createdAt: iso(r.created_at)!,
    createdByEmail: r.created_by_email,
    committedAt: iso(r.committed_at),
    sensors: r.sensors,
    rooms: r.rooms,
  }));
}

/** One log with its sensors, as far as the member may see it; 404 otherwise. */
export async function getLog(
  db: Kysely<Database>,
  trust: ActiveTrust,
  userId: string | null,
  id: string,
): Promise<LogView> {
  const { rows } = await sql<{
    id: string;
    file_name: string;
    file_kind: string;
    file_size_bytes: number;
    status: string;
    layout: unknown;
    time_basis: string;
    reading_count: number;
    first_at: Date | null;
    last_at: Date | null;
    problems: ProblemTally[];
    outcome: unknown;
    created_at: Date;
    created_by_email: string | null;
    created_by_user_id: string | null;
    committed_at: Date | null;
    deleted_at: Date | null;
  }>`SELECT l.* FROM monitor_logs l WHERE l.id = ${id}::uuid AND l.trust_id = ${trust.id} AND ${visibleSql(trust, userId)}`.execute(
    db,
  );
  const log = rows[0];
  if (!log || log.status === 'cancelled') throw notFound('That monitor log');
  const sensors = await db
    .selectFrom('monitor_log_sensors as s')
    .leftJoin('rooms as r', 'r.id', 's.room_id')
    .leftJoin('schools as sc', 'sc.id', 'r.school_id')
    .select([
      's.id',
      's.sensor_key',
      's.match',
      's.room_id',
      'r.code as room_code',
      'sc.name as school_name',
      'sc.id as school_id',
      's.candidates',
      's.reading_count',
      's.day_count',
      's.first_at',
      's.last_at',
      's.interval_seconds',
      's.extras',
      's.problems',
    ])
    .where('s.log_id', '=', id)
    .orderBy('s.sensor_key')
    .execute();
  const mine = log.created_by_user_id !== null && log.created_by_user_id === userId;
  const visible = sensors.filter(
    (s) => !trust.schoolIds || (s.school_id ? trust.schoolIds.includes(s.school_id) : mine),
  );
  return {
    id: log.id,
    fileName: log.file_name,
    fileKind: log.file_kind,
    fileSizeBytes: Number(log.file_size_bytes),
    status: log.status,
    layout: log.layout,
    timeBasis: log.time_basis,
    readings: log.reading_count,
    firstAt: iso(log.first_at),
    lastAt: iso(log.last_at),
    problems: log.problems,
    outcome: log.outcome,
    createdAt: iso(log.created_at)!,
    createdByEmail: log.created_by_email,
    committedAt: iso(log.committed_at),
    deletedAt: iso(log.deleted_at),
    sensors: visible.map((s) => ({
      id: s.id,
      sensorKey: s.sensor_key,
      match: s.match,
      roomId: s.room_id,
      roomCode: s.room_code,
      schoolName: s.school_name,
      candidates: (s.candidates as LogSensorView['candidates']).filter(
        (c) => !trust.schoolIds || trust.schoolIds.includes(c.schoolId),
      ),
      readings: s.reading_count,
      days: s.day_count,
      firstAt: iso(s.first_at),
      lastAt: iso(s.last_at),
      intervalSeconds: s.interval_seconds,
      extras: s.extras as LogSensorView['extras'],
      problems: s.problems as ProblemTally[],
    })),
    hiddenSensors: sensors.length - visible.length,
  };
}
