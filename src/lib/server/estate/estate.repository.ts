import { sql, type ExpressionBuilder, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import type { RoomListQuery } from './estate.schemas';
import type { Block, Page, Room, School, SchoolSummary } from './estate.types';
import { parseStoredTimetable, timetableText } from './timetable';

/** A WHERE condition on `schools` for the trust and, for school-limited members, their schools. */
export function inTrustScope(trust: ActiveTrust) {
  const inTrust = sql<boolean>`schools.trust_id = ${trust.id}`;
  if (!trust.schoolIds) return inTrust;
  return sql<boolean>`${inTrust} AND schools.id = ANY(${trust.schoolIds}::uuid[])`;
}

const schoolSummaryColumns = (eb: ExpressionBuilder<Database, 'schools'>) =>
  [
    'schools.id',
    'schools.name',
    'schools.reference_number',
    'schools.phase',
    'schools.climate_region',
    'schools.address',
    eb
      .selectFrom('blocks')
      .whereRef('blocks.school_id', '=', 'schools.id')
      .select(sql<number>`count(*)::int`.as('n'))
      .as('block_count'),
    eb
      .selectFrom('rooms')
      .whereRef('rooms.school_id', '=', 'schools.id')
      .select(sql<number>`count(*)::int`.as('n'))
      .as('room_count'),
    eb
      .selectFrom('rooms')
      .whereRef('rooms.school_id', '=', 'schools.id')
      .select(sql<number>`coalesce(sum(pupils), 0)::int`.as('n'))
      .as('pupil_count'),
  ] as const;

type SummaryRow = {
  id: string;
  name: string;
  reference_number: string | null;
  phase: string;
  climate_region: string;
  address: string | null;
  block_count: number | null;
  room_count: number | null;
  pupil_count: number | null;
};

const toSchoolSummary = (row: SummaryRow): SchoolSummary => ({
  id: row.id,
  name: row.name,
  referenceNumber: row.reference_number,
  phase: row.phase as SchoolSummary['phase'],
  climateRegion: row.climate_region as SchoolSummary['climateRegion'],
  address: row.address,
  blockCount: row.block_count ?? 0,
  roomCount: row.room_count ?? 0,
  pupilCount: row.pupil_count ?? 0,
});

/** Every school of the trust with block, room and pupil counts, by name. */
export async function listSchools(db: Kysely<Database>, trust: ActiveTrust): Promise<SchoolSummary[]> {
  const rows = await db
    .selectFrom('schools')
    .select(schoolSummaryColumns)
    .where(inTrustScope(trust))
    .orderBy('schools.name')
    .execute();
  return rows.map(toSchoolSummary);
}

/** One school with its blocks, or null when it is not in the trust's scope. */
export async function getSchool(db: Kysely<Database>, trust: ActiveTrust, id: string): Promise<School | null> {
  const row = await db
    .selectFrom('schools')
    .select((eb) => [
      ...schoolSummaryColumns(eb),
      'heating_fuel',
      'fuel_price_gbp_per_kwh',
      'heating_efficiency',
      'timetable',
    ])
    .where(inTrustScope(trust))
    .where('schools.id', '=', id)
    .executeTakeFirst();
  if (!row) return null;
  const blocks = await db
    .selectFrom('blocks')
    .selectAll('blocks')
    .select((eb) =>
      eb
        .selectFrom('rooms')
        .whereRef('rooms.block_id', '=', 'blocks.id')
        .select(sql<number>`count(*)::int`.as('n'))
        .as('room_count'),
    )
    .where('school_id', '=', id)
    .orderBy('name')
    .execute();
  return {
    ...toSchoolSummary(row),
    heatingFuel: row.heating_fuel as School['heatingFuel'],
    fuelPriceGbpPerKwh: row.fuel_price_gbp_per_kwh,
    heatingEfficiency: row.heating_efficiency,
    timetableText: timetableText(parseStoredTimetable(row.timetable)),
    blocks: blocks.map(
      (b): Block => ({
        id: b.id,
        schoolId: b.school_id,
        name: b.name,
        yearBuilt: b.year_built,
        constructionType: b.construction_type as Block['constructionType'],
        airPermeabilityM3hM2: b.air_permeability_m3h_m2,
        heatingType: b.heating_type as Block['heatingType'],
        heatingFuel: b.heating_fuel as Block['heatingFuel'],
        fuelPriceGbpPerKwh: b.fuel_price_gbp_per_kwh,
        heatingEfficiency: b.heating_efficiency,
        heatingInstalledYear: b.heating_installed_year,
        roomCount: b.room_count ?? 0,
      }),
    ),
  };
}

function roomsQuery(db: Kysely<Database>, trust: ActiveTrust) {
  return db
    .selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .leftJoin('blocks', 'blocks.id', 'rooms.block_id')
    .where(inTrustScope(trust));
}

type RoomJoinRow = {
  [K in keyof Database['rooms']]: unknown;
} & { school_name: string; block_name: string | null };

const toRoom = (r: RoomJoinRow): Room => ({
  id: r.id as string,
  schoolId: r.school_id as string,
  schoolName: r.school_name,
  blockId: r.block_id as string | null,
  blockName: r.block_name,
  code: r.code as string,
  name: r.name as string,
  use: r.use as Room['use'],
  floorAreaM2: r.floor_area_m2 as number,
  ceilingHeightM: r.ceiling_height_m as number | null,
  pupils: r.pupils as number | null,
  adults: r.adults as number | null,
  ageGroup: r.age_group as Room['ageGroup'],
  orientationDeg: r.orientation_deg as number | null,
  glazingAreaM2: r.glazing_area_m2 as number | null,
  openableAreaM2: r.openable_area_m2 as number | null,
  windowType: r.window_type as Room['windowType'],
  frameMaterial: r.frame_material as Room['frameMaterial'],
  glazingGValue: r.glazing_g_value as number | null,
  ventilationType: r.ventilation_type as Room['ventilationType'],
  mechanicalSupplyLps: r.mechanical_supply_lps as number | null,
  winterWindowOpenFraction: r.winter_window_open_fraction as number | null,
  notes: r.notes as string | null,
  updatedAt: (r.updated_at as Date).toISOString(),
});

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
  return {
    rows: rows.map((r) => toRoom(r as unknown as RoomJoinRow)),
    total,
    page: query.page,
    pageSize: query.pageSize,
  };
}

/** One room with its school and block names, or null when outside the trust's scope. */
export async function getRoom(db: Kysely<Database>, trust: ActiveTrust, id: string): Promise<Room | null> {
  const row = await roomsQuery(db, trust)
    .selectAll('rooms')
    .select(['schools.name as school_name', 'blocks.name as block_name'])
    .where('rooms.id', '=', id)
    .executeTakeFirst();
  return row ? toRoom(row as unknown as RoomJoinRow) : null;
}
