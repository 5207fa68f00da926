/** Queries of the `schools` table, and the one mapping between its rows and the estate's schools. */
import { type ExpressionBuilder, type Insertable, type Kysely, sql } from 'kysely';
import type { Database, SchoolRow } from '../../../../db/database';
import type { SchoolsTable } from '../../../../db/tables/estate';
import type { ActiveTrust } from '../auth/context';
import { toBlockRecord } from './blocks.repository';
import { inTrustScope } from './estate.repository';
import type { School, SchoolFields, SchoolOption, SchoolRecord, SchoolSummary, Some } from './estate.types';
import { parseStoredTimetable, timetableText } from './timetable';

/** The columns toSchoolRecord reads. */
export type SchoolRecordColumns = Omit<SchoolRow, 'trust_id' | 'created_at' | 'updated_at'>;

const RECORD_COLUMNS = [
  'schools.id',
  'schools.name',
  'schools.reference_number',
  'schools.phase',
  'schools.climate_region',
  'schools.address',
  'schools.heating_fuel',
  'schools.fuel_price_gbp_per_kwh',
  'schools.heating_efficiency',
  'schools.timetable',
] as const;

/** A school row → the school it records (a stored timetable that is not one reads as none). */
export function toSchoolRecord(s: SchoolRecordColumns): SchoolRecord {
  return {
    id: s.id,
    name: s.name,
    referenceNumber: s.reference_number,
    phase: s.phase,
    climateRegion: s.climate_region,
    address: s.address,
    heatingFuel: s.heating_fuel,
    fuelPriceGbpPerKwh: s.fuel_price_gbp_per_kwh,
    heatingEfficiency: s.heating_efficiency,
    timetable: parseStoredTimetable(s.timetable),
  };
}

/** Some of a school's attributes → its columns (fields left undefined are not written). */
export function schoolColumns(f: Some<SchoolFields>): Partial<Insertable<SchoolsTable>> {
  const set: Partial<Insertable<SchoolsTable>> = {};
  if (f.name !== undefined) set.name = f.name;
  if (f.referenceNumber !== undefined) set.reference_number = f.referenceNumber;
  if (f.phase !== undefined) set.phase = f.phase;
  if (f.climateRegion !== undefined) set.climate_region = f.climateRegion;
  if (f.address !== undefined) set.address = f.address;
  if (f.heatingFuel !== undefined) set.heating_fuel = f.heatingFuel;
  if (f.fuelPriceGbpPerKwh !== undefined) set.fuel_price_gbp_per_kwh = f.fuelPriceGbpPerKwh;
  if (f.heatingEfficiency !== undefined) set.heating_efficiency = f.heatingEfficiency;
  if (f.timetable !== undefined) set.timetable = f.timetable === null ? null : JSON.stringify(f.timetable);
  return set;
}

const countColumns = (eb: ExpressionBuilder<Database, 'schools'>) =>
  [
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

type Counts = { block_count: number | null; room_count: number | null; pupil_count: number | null };

const toSchoolSummary = (s: SchoolRecord, counts: Counts): SchoolSummary => ({
  id: s.id,
  name: s.name,
  referenceNumber: s.referenceNumber,
  phase: s.phase,
  climateRegion: s.climateRegion,
  address: s.address,
  blockCount: counts.block_count ?? 0,
  roomCount: counts.room_count ?? 0,
  pupilCount: counts.pupil_count ?? 0,
});

/** Every school of the trust with block, room and pupil counts, by name. */
export async function listSchools(db: Kysely<Database>, trust: ActiveTrust): Promise<SchoolSummary[]> {
  const rows = await db
    .selectFrom('schools')
    .select(RECORD_COLUMNS)
    .select(countColumns)
    .where(inTrustScope(trust))
    .orderBy('schools.name')
    .execute();
  return rows.map((row) => toSchoolSummary(toSchoolRecord(row), row));
}

/** One school with its blocks, or null when it is not in the trust's scope. */
export async function getSchool(db: Kysely<Database>, trust: ActiveTrust, id: string): Promise<School | null> {
  const row = await db
    .selectFrom('schools')
    .select(RECORD_COLUMNS)
    .select(countColumns)
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
  const school = toSchoolRecord(row);
  return {
    ...toSchoolSummary(school, row),
    heatingFuel: school.heatingFuel,
    fuelPriceGbpPerKwh: school.fuelPriceGbpPerKwh,
    heatingEfficiency: school.heatingEfficiency,
    timetableText: timetableText(school.timetable),
    blocks: blocks.map((b) => ({ ...toBlockRecord(b), roomCount: b.room_count ?? 0 })),
  };
}

/** The member's schools with their blocks, by name (filters and pickers). */
export async function listSchoolOptions(db: Kysely<Database>, trust: ActiveTrust): Promise<SchoolOption[]> {
  const rows = await db
    .selectFrom('schools')
    .leftJoin('blocks', 'blocks.school_id', 'schools.id')
    .select([
      'schools.id as school_id',
      'schools.name as school_name',
      'blocks.id as block_id',
      'blocks.name as block_name',
    ])
    .where(inTrustScope(trust))
    .orderBy('schools.name')
    .orderBy('blocks.name')
    .execute();
  const schools = new Map<string, SchoolOption>();
  for (const r of rows) {
    const school = schools.get(r.school_id) ?? { id: r.school_id, name: r.school_name, blocks: [] };
    schools.set(r.school_id, school);
    if (r.block_id && r.block_name) school.blocks.push({ id: r.block_id, name: r.block_name });
  }
  return [...schools.values()];
}

/** Every school of the trust by name, whatever the member's own school limits (invitation forms). */
export async function listTrustSchoolNames(
  db: Kysely<Database>,
  trustId: string,
): Promise<{ id: string; name: string }[]> {
  return db.selectFrom('schools').select(['id', 'name']).where('trust_id', '=', trustId).orderBy('name').execute();
}

/** A school in the trust's scope, or null; `lock` holds it for the rest of the transaction. */
export async function findSchool(
  db: Kysely<Database>,
  trust: ActiveTrust,
  id: string,
  lock = false,
): Promise<SchoolRecord | null> {
  let query = db.selectFrom('schools').select(RECORD_COLUMNS).where(inTrustScope(trust)).where('schools.id', '=', id);
  if (lock) query = query.forUpdate();
  const row = await query.executeTakeFirst();
  return row ? toSchoolRecord(row) : null;
}

/** Inserts schools of a trust; answers their ids in the order given. */
export async function insertSchools(
  db: Kysely<Database>,
  trustId: string,
  schools: readonly (Some<SchoolFields> & Pick<SchoolFields, 'name' | 'phase' | 'climateRegion'>)[],
): Promise<string[]> {
  if (schools.length === 0) return [];
  const values = schools.map(
    (s): Insertable<SchoolsTable> => ({
      ...schoolColumns(s),
      trust_id: trustId,
      name: s.name,
      phase: s.phase,
      climate_region: s.climateRegion,
    }),
  );
  const created = await db.insertInto('schools').values(values).returning(['id', 'name']).execute();
  const idByName = new Map(created.map((r) => [r.name, r.id]));
  return schools.map((s) => idByName.get(s.name) as string);
}

/** Writes some attributes of a school. */
export async function updateSchoolRow(db: Kysely<Database>, id: string, fields: Some<SchoolFields>): Promise<void> {
  const set = schoolColumns(fields);
  if (Object.keys(set).length === 0) return;
  await db.updateTable('schools').set(set).where('id', '=', id).execute();
}

/** Holds the trust's row for the rest of the transaction, so two requests cannot both pass the plan check. */
export async function lockTrustForNewSchools(db: Kysely<Database>, trustId: string): Promise<void> {
  await db.selectFrom('trusts').select('id').where('id', '=', trustId).forUpdate().executeTakeFirst();
}

/** What goes with a school when it is removed: its blocks, rooms, assessed rooms and the members limited to it. */
export interface SchoolRemovalImpact {
  blocks: number;
  rooms: number;
  assessedRooms: number;
  limitedMembers: number;
}

/** Counts what removing a school would take with it (its rows cascade: blocks, rooms, results, readings). */
export async function countSchoolDependants(db: Kysely<Database>, schoolId: string): Promise<SchoolRemovalImpact> {
  const row = await db
    .selectNoFrom((eb) => [
      eb.selectFrom('blocks').select(eb.fn.countAll<string>().as('n')).where('school_id', '=', schoolId).as('blocks'),
      eb.selectFrom('rooms').select(eb.fn.countAll<string>().as('n')).where('school_id', '=', schoolId).as('rooms'),
      // Rooms with results: the school's rooms in any run of its trust (results are stored per run and school).
      eb
        .selectFrom('room_results')
        .innerJoin('assessment_runs', 'assessment_runs.id', 'room_results.run_id')
        .innerJoin('schools', 'schools.trust_id', 'assessment_runs.trust_id')
        .select((e) => e.fn.count<string>('room_results.room_id').distinct().as('n'))
        .where('schools.id', '=', schoolId)
        .whereRef('room_results.school_id', '=', 'schools.id')
        .as('assessed'),
      eb
        .selectFrom('membership_schools')
        .select(eb.fn.countAll<string>().as('n'))
        .where('school_id', '=', schoolId)
        .as('limited'),
    ])
    .executeTakeFirstOrThrow();
  return {
    blocks: Number(row.blocks ?? 0),
    rooms: Number(row.rooms ?? 0),
    assessedRooms: Number(row.assessed ?? 0),
    limitedMembers: Number(row.limited ?? 0),
  };
}

/** Deletes a school's row; its blocks, rooms and everything hanging from them go with it (ON DELETE CASCADE). */
export async function deleteSchoolRow(db: Kysely<Database>, id: string): Promise<void> {
  await db.deleteFrom('schools').where('id', '=', id).execute();
}
