/** What the portfolio pages need before any island loads: filter options and which empty state applies. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import { inTrustScope } from '../estate/estate.repository';

export interface SchoolOption {
  id: string;
  name: string;
  blocks: { id: string; name: string }[];
}

/** The member's schools with their blocks, by name. */
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

/** Whether the trust has rooms in its register and current results (drives the empty states). */
export async function portfolioState(
  db: Kysely<Database>,
  trust: ActiveTrust,
): Promise<{ hasRooms: boolean; hasResults: boolean }> {
  const row = await sql<{ has_rooms: boolean; has_results: boolean }>`
    SELECT EXISTS (SELECT 1 FROM rooms JOIN schools ON schools.id = rooms.school_id WHERE ${inTrustScope(trust)}) AS has_rooms,
      EXISTS (SELECT 1 FROM current_room_results rr WHERE rr.trust_id = ${trust.id}
        ${trust.schoolIds ? sql`AND rr.school_id = ANY(${trust.schoolIds}::uuid[])` : sql``}) AS has_results`.execute(
    db,
  );
  return { hasRooms: row.rows[0]?.has_rooms ?? false, hasResults: row.rows[0]?.has_results ?? false };
}
