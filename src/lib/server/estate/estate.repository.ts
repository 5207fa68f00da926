/** Reads of the estate as a whole: the trust's scope, its fingerprint, and every record at once. */
import { type Kysely, sql } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import { toBlockRecord } from './blocks.repository';
import type { EstateRecords, PlacedRoom } from './estate.types';
import { toRoomFields, toRoomRecord } from './rooms.repository';
import { toSchoolRecord } from './schools.repository';

/** A WHERE condition on `schools` for the trust and, for school-limited members, their schools. */
export function inTrustScope(trust: ActiveTrust) {
  const inTrust = sql<boolean>`schools.trust_id = ${trust.id}`;
  if (!trust.schoolIds) return inTrust;
  return sql<boolean>`${inTrust} AND schools.id = ANY(${trust.schoolIds}::uuid[])`;
}

/**
 * A cheap fingerprint of the trust's estate: how many schools, blocks and rooms, and when each
 * last changed. Any insert, update or delete since changes it.
 */
export async function estateFingerprint(db: Kysely<Database>, trust: ActiveTrust): Promise<string> {
  const { rows } = await sql<{ f: string }>`
    SELECT concat_ws('|',
      (SELECT count(*) || '@' || coalesce(max(updated_at)::text, '') FROM schools WHERE ${inTrustScope(trust)}),
      (SELECT count(*) || '@' || coalesce(max(b.updated_at)::text, '') FROM blocks b JOIN schools ON schools.id = b.school_id WHERE ${inTrustScope(trust)}),
      (SELECT count(*) || '@' || coalesce(max(r.updated_at)::text, '') FROM rooms r JOIN schools ON schools.id = r.school_id WHERE ${inTrustScope(trust)})
    ) AS f`.execute(db);
  return rows[0]?.f ?? '';
}

/** Every school, block and room in the trust's scope. */
export async function loadEstateRecords(db: Kysely<Database>, trust: ActiveTrust): Promise<EstateRecords> {
  const schools = await db.selectFrom('schools').selectAll().where(inTrustScope(trust)).execute();
  const ids = schools.map((s) => s.id);
  const blocks = ids.length ? await db.selectFrom('blocks').selectAll().where('school_id', 'in', ids).execute() : [];
  const rooms = ids.length ? await db.selectFrom('rooms').selectAll().where('school_id', 'in', ids).execute() : [];
  return { schools: schools.map(toSchoolRecord), blocks: blocks.map(toBlockRecord), rooms: rooms.map(toRoomRecord) };
}

/** Every room in the trust's scope with its school and block, ordered by school, block and room code (as stored). */
export async function listPlacedRooms(db: Kysely<Database>, trust: ActiveTrust): Promise<PlacedRoom[]> {
  const [schools, blocks, rooms] = await Promise.all([
    db.selectFrom('schools').selectAll().where(inTrustScope(trust)).execute(),
    db
      .selectFrom('blocks')
      .innerJoin('schools', 'schools.id', 'blocks.school_id')
      .selectAll('blocks')
      .where(inTrustScope(trust))
      .execute(),
    db
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .leftJoin('blocks', 'blocks.id', 'rooms.block_id')
      .selectAll('rooms')
      .where(inTrustScope(trust))
      .orderBy('schools.name')
      .orderBy('blocks.name')
      .orderBy('rooms.code')
      .execute(),
  ]);
  const schoolById = new Map(schools.map((s) => [s.id, toSchoolRecord(s)]));
  const blockById = new Map(blocks.map((b) => [b.id, toBlockRecord(b)]));
  return rooms.map((r) => ({
    school: schoolById.get(r.school_id)!,
    block: r.block_id === null ? null : (blockById.get(r.block_id) ?? null),
    room: toRoomFields(r),
  }));
}
