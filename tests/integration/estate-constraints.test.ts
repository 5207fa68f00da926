import type { Kysely } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { limitMessage, ROOM_LIMITS } from '../../src/lib/engine/limits';
import type { Database, NewRoom } from '../../db/database';
import { fromDatabaseError } from '../../src/lib/server/http/errors';
import { testDb } from '../helpers/db';

/** Rooms the schema must refuse, each with the constraint that refuses it. */
const IMPOSSIBLE_ROOMS: [string, Partial<NewRoom>, string][] = [
  ['a zero floor area', { floor_area_m2: 0 }, 'rooms_floor_area_range'],
  ['a negative floor area', { floor_area_m2: -5 }, 'rooms_floor_area_range'],
  [
    '550 people in 2 m³',
    { floor_area_m2: 1, ceiling_height_m: 2, pupils: 500, adults: 50, glazing_area_m2: 1, openable_area_m2: 0.5 },
    'rooms_occupant_density',
  ],
  ['a winter window opening above 100 %', { winter_window_open_fraction: 1.5 }, 'rooms_winter_window_range'],
  ['a 1.5 m ceiling', { ceiling_height_m: 1.5 }, 'rooms_ceiling_height_range'],
  ['a 14 m ceiling', { ceiling_height_m: 14 }, 'rooms_ceiling_height_range'],
  ['more openable area than glazing', { glazing_area_m2: 4, openable_area_m2: 6 }, 'rooms_openable_within_glazing'],
  ['negative pupils', { pupils: -1 }, 'rooms_pupils_range'],
  ['a bearing of 360°', { orientation_deg: 360 }, 'rooms_orientation_range'],
  // The types refuse an unknown ventilation type; it is sent anyway to reach the CHECK constraint.
  ['an unknown ventilation type', { ventilation_type: 'open_door' as never }, 'rooms_ventilation_known'],
  ['a g-value above 1', { glazing_g_value: 1.4 }, 'rooms_g_value_range'],
];

describe('room constraints', () => {
  let db: Kysely<Database>;
  let schoolId: string;
  let otherSchoolBlockId: string;
  const base = (): NewRoom => ({
    school_id: schoolId,
    code: `T-${Math.random().toString(36).slice(2, 8)}`,
    floor_area_m2: 55,
    ceiling_height_m: 2.7,
    age_group: 'primary',
    ventilation_type: 'natural_single_sided',
    glazing_area_m2: 10,
    openable_area_m2: 2,
  });

  beforeAll(async () => {
    db = testDb();
    const schools = await db
      .selectFrom('schools')
      .select('id')
      .where('trust_id', '=', 'demo-trust')
      .orderBy('name')
      .limit(2)
      .execute();
    schoolId = schools[0]!.id;
    otherSchoolBlockId = (
      await db.selectFrom('blocks').select('id').where('school_id', '=', schools[1]!.id).executeTakeFirstOrThrow()
    ).id;
  });
  afterAll(async () => {
    await db.deleteFrom('rooms').where('code', 'like', 'T-%').execute();
    await db.destroy();
  });

  it('accepts a sensible room', async () => {
    const inserted = await db.insertInto('rooms').values(base()).returning('id').executeTakeFirst();
    expect(inserted?.id).toMatch(/^[0-9a-f-]{36}$/);
  });

  for (const [what, change, constraint] of IMPOSSIBLE_ROOMS) {
    it(`rejects a room with ${what}, with a message a person can act on`, async () => {
      const error = await db
        .insertInto('rooms')
        .values({ ...base(), ...change })
        .execute()
        .then(
          () => null,
          (e: unknown) => e,
        );
      expect(error).toMatchObject({ constraint });
      const appError = fromDatabaseError(error);
      expect(appError?.status).toBe(400);
      expect(appError?.message).not.toMatch(/violates|constraint|stack/i);
    });
  }

  // One set of limits: the database's CHECK constraints accept each limit of src/lib/engine/limits.ts at its ends and
  // refuse just beyond them, with the same words the API and the engine use.
  const COLUMN_LIMITS: [keyof typeof ROOM_LIMITS, string, string, number][] = [
    ['floorAreaM2', 'floor_area_m2', 'rooms_floor_area_range', 0.01],
    ['ceilingHeightM', 'ceiling_height_m', 'rooms_ceiling_height_range', 0.01],
    ['pupils', 'pupils', 'rooms_pupils_range', 1],
    ['adults', 'adults', 'rooms_adults_range', 1],
    ['orientationDeg', 'orientation_deg', 'rooms_orientation_range', 1],
    ['glazingGValue', 'glazing_g_value', 'rooms_g_value_range', 0.01],
    ['mechanicalSupplyLps', 'mechanical_supply_lps', 'rooms_mechanical_supply_range', 0.1],
    ['winterWindowOpenFraction', 'winter_window_open_fraction', 'rooms_winter_window_range', 0.01],
  ];
  for (const [field, column, constraint, step] of COLUMN_LIMITS) {
    it(`holds ${field} to the one declared range (${ROOM_LIMITS[field].min}–${ROOM_LIMITS[field].max})`, async () => {
      const limit = ROOM_LIMITS[field];
      // A big room so that occupant density and glazing never get in the way.
      const room = (value: number) => ({ ...base(), floor_area_m2: 5000, glazing_area_m2: 100, [column]: value });
      if (field !== 'floorAreaM2') {
        await db.insertInto('rooms').values(room(limit.min)).execute();
        await db.insertInto('rooms').values(room(limit.max)).execute();
      }
      for (const outside of [limit.min - step, limit.max + step]) {
        const error = await db
          .insertInto('rooms')
          .values(room(outside))
          .execute()
          .then(
            () => null,
            (e: unknown) => e,
          );
        expect(error, `${field} = ${outside}`).toMatchObject({ constraint });
        expect(fromDatabaseError(error)?.message).toContain(limitMessage(limit).replace(/\.$/, ''));
      }
    });
  }

  it('rejects a second room with the same code in the same school as a conflict', async () => {
    const room = base();
    await db.insertInto('rooms').values(room).execute();
    const error = await db
      .insertInto('rooms')
      .values({ ...base(), code: room.code })
      .execute()
      .then(
        () => null,
        (e: unknown) => e,
      );
    expect(fromDatabaseError(error)).toMatchObject({
      status: 409,
      message: expect.stringMatching(/unique within a school/),
    });
  });

  it('rejects a room placed in a block of another school', async () => {
    const error = await db
      .insertInto('rooms')
      .values({ ...base(), block_id: otherSchoolBlockId })
      .execute()
      .then(
        () => null,
        (e: unknown) => e,
      );
    expect(error).toMatchObject({ constraint: 'rooms_block_in_same_school' });
  });

  it('refuses to delete a block that still has rooms, so no room is orphaned', async () => {
    const block = await db
      .selectFrom('blocks')
      .innerJoin('rooms', 'rooms.block_id', 'blocks.id')
      .select('blocks.id')
      .executeTakeFirstOrThrow();
    const error = await db
      .deleteFrom('blocks')
      .where('id', '=', block.id)
      .execute()
      .then(
        () => null,
        (e: unknown) => e,
      );
    expect(fromDatabaseError(error)?.status).toBe(409);
  });
});
