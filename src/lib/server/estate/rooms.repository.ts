/** Queries of the `rooms` table, and the one mapping between its rows and the estate's rooms. */
import { type Insertable, sql, type Kysely } from 'kysely';
import type { Database, RoomRow } from '../../../../db/database';
import type { RoomsTable } from '../../../../db/tables/estate';
import type { ActiveTrust } from '../auth/context';
import { inTrustScope } from './estate.repository';
import type { RoomFieldName, RoomFields, RoomListQuery } from './estate.schemas';
import type { Page, Room, RoomRecord, Some } from './estate.types';

/**
 * The room's own columns: column, PostgreSQL type (for staging tables) and field, in one order. The editors, the
 * import's bulk writer and its audit trail all write rooms through this list.
 */
export const ROOM_COLUMNS = [
  ['code', 'text', 'code'],
  ['name', 'text', 'name'],
  ['use', 'text', 'use'],
  ['floor_area_m2', 'float8', 'floorAreaM2'],
  ['ceiling_height_m', 'float8', 'ceilingHeightM'],
  ['pupils', 'int4', 'pupils'],
  ['adults', 'int4', 'adults'],
  ['age_group', 'text', 'ageGroup'],
  ['orientation_deg', 'int4', 'orientationDeg'],
  ['glazing_area_m2', 'float8', 'glazingAreaM2'],
  ['openable_area_m2', 'float8', 'openableAreaM2'],
  ['window_type', 'text', 'windowType'],
  ['frame_material', 'text', 'frameMaterial'],
  ['glazing_g_value', 'float8', 'glazingGValue'],
  ['ventilation_type', 'text', 'ventilationType'],
  ['mechanical_supply_lps', 'float8', 'mechanicalSupplyLps'],
  ['winter_window_open_fraction', 'float8', 'winterWindowOpenFraction'],
  ['notes', 'text', 'notes'],
] as const satisfies readonly (readonly [keyof RoomsTable, string, RoomFieldName])[];

type RoomColumn = (typeof ROOM_COLUMNS)[number][0];

/** The columns toRoomFields reads. */
export type RoomFieldColumns = Pick<RoomRow, RoomColumn>;

/** A room row → the room's own attributes (nulls stay unknown). */
export function toRoomFields(r: RoomFieldColumns): RoomFields {
  return {
    code: r.code,
    name: r.name,
    use: r.use,
    floorAreaM2: r.floor_area_m2,
    ceilingHeightM: r.ceiling_height_m,
    pupils: r.pupils,
    adults: r.adults,
    ageGroup: r.age_group,
    orientationDeg: r.orientation_deg,
    glazingAreaM2: r.glazing_area_m2,
    openableAreaM2: r.openable_area_m2,
    windowType: r.window_type,
    frameMaterial: r.frame_material,
    glazingGValue: r.glazing_g_value,
    ventilationType: r.ventilation_type,
    mechanicalSupplyLps: r.mechanical_supply_lps,
    winterWindowOpenFraction: r.winter_window_open_fraction,
    notes: r.notes,
  };
}

/** A room row → the stored room: its place and attributes. */
export function toRoomRecord(r: RoomFieldColumns & Pick<RoomRow, 'id' | 'school_id' | 'block_id'>): RoomRecord {
  return { id: r.id, schoolId: r.school_id, blockId: r.block_id, fields: toRoomFields(r) };
}

/** Some of a room's attributes → its columns (fields left undefined are not written). */
export function roomColumns(fields: Some<RoomFields>): Partial<Insertable<RoomsTable>> {
  const columns: Record<string, unknown> = {};
  for (const [column, , field] of ROOM_COLUMNS) if (fields[field] !== undefined) columns[column] = fields[field];
  return columns as Partial<Insertable<RoomsTable>>;
}

/** A room with every attribute and the names of its school and block. */
const toRoom = (r: RoomRow & { school_name: string; block_name: string | null }): Room => ({
  id: r.id,
  schoolId: r.school_id,
  schoolName: r.school_name,
  blockId: r.block_id,
  blockName: r.block_name,
  ...toRoomFields(r),
  updatedAt: r.updated_at.toISOString(),
});

function roomsQuery(db: Kysely<Database>, trust: ActiveTrust) {
  return db
    .selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .leftJoin('blocks', 'blocks.id', 'rooms.block_id')
    .where(inTrustScope(trust));
}

const SORT_COLUMNS = {
  code: 'rooms.code',
  name: 'rooms.name',
  school: 'schools.name',
  block: 'blocks.name',
  use: 'rooms.use',
  floorAreaM2: 'rooms.floor_area_m2',
  pupils: 'rooms.pupils',
  ventilationType: 'rooms.ventilation_type',
  openableAreaM2: 'rooms.openable_area_m2',
} as const;

/** A page of the trust's rooms, filtered and sorted on the server; ties broken by school then code. */
export async function listRooms(db: Kysely<Database>, trust: ActiveTrust, query: RoomListQuery): Promise<Page<Room>> {
  let base = roomsQuery(db, trust);
  if (query.schoolId) base = base.where('rooms.school_id', '=', query.schoolId);
  if (query.blockId) base = base.where('rooms.block_id', '=', query.blockId);
  if (query.use) base = base.where('rooms.use', '=', query.use);
  if (query.ventilationType) base = base.where('rooms.ventilation_type', '=', query.ventilationType);
  if (query.q) {
    const pattern = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    base = base.where((eb) => eb.or([eb('rooms.code', 'ilike', pattern), eb('rooms.name', 'ilike', pattern)]));
  }
  const [{ total }, rows] = await Promise.all([
    base.select(sql<number>`count(*)::int`.as('total')).executeTakeFirstOrThrow(),
    base
      .selectAll('rooms')
      .select(['schools.name as school_name', 'blocks.name as block_name'])
      .orderBy(SORT_COLUMNS[query.sort], query.dir)
      .orderBy('schools.name')
      .orderBy('rooms.code')
      .orderBy('rooms.id')
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize)
      .execute(),
  ]);
  return { rows: rows.map(toRoom), total, page: query.page, pageSize: query.pageSize };
}

/** One room with its school and block names, or null when outside the trust's scope. */
export async function getRoom(db: Kysely<Database>, trust: ActiveTrust, id: string): Promise<Room | null> {
  const row = await roomsQuery(db, trust)
    .selectAll('rooms')
    .select(['schools.name as school_name', 'blocks.name as block_name'])
    .where('rooms.id', '=', id)
    .executeTakeFirst();
  return row ? toRoom(row) : null;
}

/** Rooms in the trust's scope, locked for the rest of the transaction, with when each last changed. */
export async function lockRooms(
  db: Kysely<Database>,
  trust: ActiveTrust,
  ids: readonly string[],
): Promise<(RoomRecord & { updatedAt: Date })[]> {
  if (ids.length === 0) return [];
  const rows = await db
    .selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .selectAll('rooms')
    .where(inTrustScope(trust))
    .where('rooms.id', 'in', ids)
    .forUpdate()
    .execute();
  return rows.map((r) => ({ ...toRoomRecord(r), updatedAt: r.updated_at }));
}

/** Inserts rooms; answers their ids in the order given. */
export async function insertRooms(
  db: Kysely<Database>,
  rooms: readonly { schoolId: string; blockId: string | null; fields: RoomFields }[],
): Promise<string[]> {
  if (rooms.length === 0) return [];
  const values = rooms.map(
    ({ schoolId, blockId, fields }): Insertable<RoomsTable> => ({
      ...roomColumns(fields),
      school_id: schoolId,
      block_id: blockId,
      code: fields.code,
      floor_area_m2: fields.floorAreaM2,
    }),
  );
  const created = await db.insertInto('rooms').values(values).returning(['id', 'school_id', 'code']).execute();
  const idByPlace = new Map(created.map((r) => [`${r.school_id}|${r.code}`, r.id]));
  return rooms.map((r) => idByPlace.get(`${r.schoolId}|${r.fields.code}`) as string);
}

/** Inserts one room; answers its id. */
export async function insertRoom(
  db: Kysely<Database>,
  place: { schoolId: string; blockId: string | null },
  fields: RoomFields,
): Promise<string> {
  const [id] = await insertRooms(db, [{ ...place, fields }]);
  return id as string;
}

/** Writes some attributes (and, when given, the block) of the rooms `ids`. */
export async function updateRooms(
  db: Kysely<Database>,
  ids: readonly string[],
  fields: Some<RoomFields>,
  blockId?: string | null,
): Promise<void> {
  const set = { ...roomColumns(fields), ...(blockId !== undefined ? { block_id: blockId } : {}) };
  if (ids.length === 0 || Object.keys(set).length === 0) return;
  await db.updateTable('rooms').set(set).where('id', 'in', ids).execute();
}

/** Deletes the rooms `ids`; answers how many there were. */
export async function deleteRoomRows(db: Kysely<Database>, ids: readonly string[]): Promise<number> {
  if (ids.length === 0) return 0;
  const deleted = await db.deleteFrom('rooms').where('id', 'in', ids).returning('id').execute();
  return deleted.length;
}

/** Takes every room of a block out of it (they stay in the school); answers how many moved. */
export async function detachRoomsFromBlock(db: Kysely<Database>, blockId: string): Promise<number> {
  const moved = await db
    .updateTable('rooms')
    .set({ block_id: null })
    .where('block_id', '=', blockId)
    .returning('id')
    .execute();
  return moved.length;
}
