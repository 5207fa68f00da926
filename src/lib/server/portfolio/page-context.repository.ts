/** What the portfolio pages need before any island loads: which empty state applies. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import { inTrustScope } from '../estate/estate.repository';

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
