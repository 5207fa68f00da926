/** The trust's blocks with rooms, for the "heating replacements to join" choice, with the plant's typical end of life. */
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import { inTrustScope } from '../estate/estate.repository';
import { FOSSIL_FUELS, TYPICAL_PLANT_LIFE_YEARS } from '../portfolio/heating-renewal';

export interface BlockOption {
  id: string;
  label: string;
  heatingDueYear: number | null;
}

/** Blocks of the member's schools, by school and name. */
export async function listBlockOptions(db: Kysely<Database>, trust: ActiveTrust): Promise<BlockOption[]> {
  const rows = await db
    .selectFrom('blocks')
    .innerJoin('schools', 'schools.id', 'blocks.school_id')
    .select([
      'blocks.id',
      'blocks.name',
      'schools.name as school_name',
      'blocks.heating_fuel',
      'schools.heating_fuel as school_fuel',
      'blocks.heating_installed_year',
    ])
    .where(inTrustScope(trust))
    .orderBy('schools.name')
    .orderBy('blocks.name')
    .execute();
  return rows.map((r) => {
    const fuel = r.heating_fuel ?? r.school_fuel;
    const fossil = (FOSSIL_FUELS as readonly string[]).includes(fuel);
    return {
      id: r.id,
      label: `${r.school_name}: ${r.name}`,
      heatingDueYear: fossil && r.heating_installed_year ? r.heating_installed_year + TYPICAL_PLANT_LIFE_YEARS : null,
    };
  });
}
