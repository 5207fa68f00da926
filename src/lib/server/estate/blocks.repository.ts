/** Queries of the `blocks` table, and the one mapping between its rows and the estate's blocks. */
import type { Insertable, Kysely } from 'kysely';
import type { BlockRow, Database } from '../../../../db/database';
import type { BlocksTable } from '../../../../db/tables/estate';
import type { ActiveTrust } from '../auth/context';
import { inTrustScope } from './estate.repository';
import type { BlockFields, BlockRecord, Some } from './estate.types';

/** The columns toBlockRecord reads. */
export type BlockRecordColumns = Omit<BlockRow, 'created_at' | 'updated_at'>;

/** A block row → the block it records. */
export function toBlockRecord(b: BlockRecordColumns): BlockRecord {
  return {
    id: b.id,
    schoolId: b.school_id,
    name: b.name,
    yearBuilt: b.year_built,
    constructionType: b.construction_type,
    airPermeabilityM3hM2: b.air_permeability_m3h_m2,
    heatingType: b.heating_type,
    heatingFuel: b.heating_fuel,
    fuelPriceGbpPerKwh: b.fuel_price_gbp_per_kwh,
    heatingEfficiency: b.heating_efficiency,
    heatingInstalledYear: b.heating_installed_year,
  };
}

/** Some of a block's attributes → its columns (fields left undefined are not written). */
export function blockColumns(f: Some<BlockFields>): Partial<Insertable<BlocksTable>> {
  const set: Partial<Insertable<BlocksTable>> = {};
  if (f.name !== undefined) set.name = f.name;
  if (f.yearBuilt !== undefined) set.year_built = f.yearBuilt;
  if (f.constructionType !== undefined) set.construction_type = f.constructionType;
  if (f.airPermeabilityM3hM2 !== undefined) set.air_permeability_m3h_m2 = f.airPermeabilityM3hM2;
  if (f.heatingType !== undefined) set.heating_type = f.heatingType;
  if (f.heatingFuel !== undefined) set.heating_fuel = f.heatingFuel;
  if (f.fuelPriceGbpPerKwh !== undefined) set.fuel_price_gbp_per_kwh = f.fuelPriceGbpPerKwh;
  if (f.heatingEfficiency !== undefined) set.heating_efficiency = f.heatingEfficiency;
  if (f.heatingInstalledYear !== undefined) set.heating_installed_year = f.heatingInstalledYear;
  return set;
}

/** A block in the trust's scope, locked for the rest of the transaction; null when there is none. */
export async function lockBlock(db: Kysely<Database>, trust: ActiveTrust, id: string): Promise<BlockRecord | null> {
  const row = await db
    .selectFrom('blocks')
    .innerJoin('schools', 'schools.id', 'blocks.school_id')
    .selectAll('blocks')
    .where(inTrustScope(trust))
    .where('blocks.id', '=', id)
    .forUpdate()
    .executeTakeFirst();
  return row ? toBlockRecord(row) : null;
}

/** Whether the block belongs to the school. */
export async function blockIsInSchool(db: Kysely<Database>, schoolId: string, blockId: string): Promise<boolean> {
  const row = await db
    .selectFrom('blocks')
    .select('id')
    .where('id', '=', blockId)
    .where('school_id', '=', schoolId)
    .executeTakeFirst();
  return row !== undefined;
}

/** Inserts blocks; answers their ids in the order given. */
export async function insertBlocks(
  db: Kysely<Database>,
  blocks: readonly (Some<BlockFields> & { schoolId: string; name: string })[],
): Promise<string[]> {
  if (blocks.length === 0) return [];
  const values = blocks.map(
    ({ schoolId, ...fields }): Insertable<BlocksTable> => ({
      ...blockColumns(fields),
      school_id: schoolId,
      name: fields.name,
    }),
  );
  const created = await db.insertInto('blocks').values(values).returning(['id', 'school_id', 'name']).execute();
  const idByPlace = new Map(created.map((r) => [`${r.school_id}|${r.name}`, r.id]));
  return blocks.map((b) => idByPlace.get(`${b.schoolId}|${b.name}`) as string);
}

/** Writes some attributes of a block. */
export async function updateBlockRow(db: Kysely<Database>, id: string, fields: Some<BlockFields>): Promise<void> {
  const set = blockColumns(fields);
  if (Object.keys(set).length === 0) return;
  await db.updateTable('blocks').set(set).where('id', '=', id).execute();
}

/** Deletes a block row (its rooms must have been moved out first). */
export async function deleteBlockRow(db: Kysely<Database>, id: string): Promise<void> {
  await db.deleteFrom('blocks').where('id', '=', id).execute();
}
