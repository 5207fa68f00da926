// A trust of its own with many rooms, written straight into the database (far quicker than an import), for
// tests that need a run long enough to interrupt.
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../db/database';
import { createOtherTrust } from './session';

export interface BigTrust {
  cookie: string;
  trustId: string;
  schoolIds: string[];
}

/** A new trust (its admin signed in) with `rooms` classrooms spread over `schools` schools of one block each. */
export async function bigTrust(db: Kysely<Database>, rooms: number, schools = 4): Promise<BigTrust> {
  const { cookie, trustId } = await createOtherTrust();
  const schoolIds: string[] = [];
  for (let s = 0; s < schools; s++) {
    const { id } = await db
      .insertInto('schools')
      .values({
        trust_id: trustId,
        name: `Large School ${s + 1}`,
        phase: 'secondary',
        climate_region: 'midlands',
        heating_fuel: 'gas',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const block = await db
      .insertInto('blocks')
      .values({ school_id: id, name: 'Main Block', year_built: 1970, construction_type: 'cavity_masonry' })
      .returning('id')
      .executeTakeFirstOrThrow();
    await sql`
      INSERT INTO rooms (school_id, block_id, code, name, use, floor_area_m2, ceiling_height_m, pupils, adults, age_group,
        orientation_deg, glazing_area_m2, openable_area_m2, window_type, ventilation_type)
      SELECT ${id}::uuid, ${block.id}::uuid, 'R' || lpad(n::text, 6, '0'), 'Room ' || n, 'classroom', 50 + (n % 20), 2.7,
        20 + (n % 12), 1, 'secondary', (n % 4) * 90, 10, 2, 'side_hung',
        CASE WHEN n % 3 = 0 THEN 'natural_cross' ELSE 'natural_single_sided' END
      FROM generate_series(1, ${Math.ceil(rooms / schools)}) AS n`.execute(db);
    schoolIds.push(id);
  }
  return { cookie, trustId, schoolIds };
}
