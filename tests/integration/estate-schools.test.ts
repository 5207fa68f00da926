// Adding, changing and removing schools from the estate pages' API, against the running app and its database.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { api, createOtherTrust, DEMO_ACCOUNTS, signIn } from '../helpers/session';
import { insertAssessedRooms } from './portfolio-fixture';

const db = testDb();
afterAll(() => db.destroy());

const send = async (cookie: string, path: string, method: string, body?: unknown) => {
  const response = await api(path, {
    method,
    cookie,
    ...(body === undefined ? {} : { body: JSON.stringify(body) }),
  });
  return { status: response.status, body: (await response.json().catch(() => null)) as any };
};

describe('a trust admin adds, edits and removes a school', () => {
  let admin: { cookie: string; trustId: string };
  beforeAll(async () => {
    admin = await createOtherTrust();
  });

  it('adds a school with what the assessments use, edits it, and removes it with its blocks and rooms', async () => {
    const created = await send(admin.cookie, '/api/schools', 'POST', {
      name: 'Kestrel Lane Primary',
      phase: 'primary',
      climateRegion: 'north_west',
      address: '4 Kestrel Lane, M14 5RT',
      heatingFuel: 'oil',
      fuelPriceGbpPerKwh: 0.075,
      heatingEfficiency: 0.82,
      timetable: '08:50-10:20 lesson\n10:20-10:40 break\n10:40-12:00 lesson',
    });
    expect(created.status).toBe(201);
    const id = created.body.school.id as string;
    const stored = await db.selectFrom('schools').selectAll().where('id', '=', id).executeTakeFirstOrThrow();
    expect(stored).toMatchObject({ phase: 'primary', climate_region: 'north_west', heating_fuel: 'oil' });
    expect(Number(stored.fuel_price_gbp_per_kwh)).toBe(0.075);
    expect(stored.timetable).toHaveLength(3);

    const edited = await send(admin.cookie, `/api/schools/${id}`, 'PATCH', { phase: 'all_through', timetable: '' });
    expect(edited.status).toBe(200);
    expect(edited.body.school).toMatchObject({ phase: 'all_through', timetableText: '' });

    const block = await send(admin.cookie, '/api/blocks', 'POST', { schoolId: id, name: 'Main' });
    expect(block.status).toBe(201);
    const blockId = block.body.block?.id ?? block.body.id;
    const plant = await send(admin.cookie, `/api/blocks/${blockId}`, 'PATCH', { heatingInstalledYear: 1998 });
    expect(plant.status).toBe(200);
    for (const code of ['K1', 'K2'])
      expect((await send(admin.cookie, '/api/rooms', 'POST', { schoolId: id, code, floorAreaM2: 50 })).status).toBe(
        201,
      );

    const removal = await send(admin.cookie, `/api/schools/${id}/removal`, 'GET');
    expect(removal.body.removal).toEqual({
      name: 'Kestrel Lane Primary',
      blocks: 1,
      rooms: 2,
      assessedRooms: 0,
      limitedMembers: 0,
    });

    const removed = await send(admin.cookie, `/api/schools/${id}`, 'DELETE');
    expect(removed.status).toBe(200);
    expect(await db.selectFrom('schools').select('id').where('id', '=', id).execute()).toEqual([]);
    expect(await db.selectFrom('rooms').select('id').where('school_id', '=', id).execute()).toEqual([]);
    const audit = await db
      .selectFrom('audit_events')
      .select(['action', 'summary'])
      .where('trust_id', '=', admin.trustId)
      .where('entity_id', '=', id)
      .orderBy('created_at')
      .execute();
    expect(audit.map((a) => a.action)).toEqual(['school.created', 'school.updated', 'school.deleted']);
    expect(audit[2]?.summary).toBe('Removed school Kestrel Lane Primary with 1 blocks and 2 rooms');

    const gone = await send(admin.cookie, `/api/schools/${id}`, 'DELETE');
    expect(gone.status).toBe(404);
    expect(gone.body.error.message).toBe('That school was not found in this trust.');
  });

  it('refuses a school without a phase, in words', async () => {
    const refused = await send(admin.cookie, '/api/schools', 'POST', {
      name: 'No Phase School',
      climateRegion: 'wales',
    });
    expect(refused.status).toBe(400);
    expect(refused.body.error.message).toMatch(/Phase must be one of: nursery, primary/);
  });
});

describe('who may remove a school', () => {
  it('says how many of an assessed school’s rooms have results before it is removed', async () => {
    const other = await createOtherTrust();
    const { schoolIds } = await insertAssessedRooms(db, {
      trustId: other.trustId,
      createTrust: false,
      schools: 2,
      roomsPerSchool: 3,
      label: 'Removal',
    });
    // Counted here through the rooms, not the way the app counts them (through the school's runs).
    const expected = await db
      .selectFrom('room_results')
      .innerJoin('rooms', 'rooms.id', 'room_results.room_id')
      .select((e) => e.fn.count<string>('room_results.room_id').distinct().as('n'))
      .where('rooms.school_id', '=', schoolIds[0]!)
      .executeTakeFirstOrThrow();
    expect(Number(expected.n)).toBe(3);
    const impact = await send(other.cookie, `/api/schools/${schoolIds[0]}/removal`, 'GET');
    expect(impact.status).toBe(200);
    expect(impact.body.removal.assessedRooms).toBe(Number(expected.n));
  });

  it('tells the demo trust’s admin what removing a school does to the paid subscription, before anything changes', async () => {
    const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
    const schools = await db.selectFrom('schools').select('id').where('trust_id', '=', 'demo-trust').execute();
    const before = await db
      .selectFrom('billing_accounts')
      .select(['quantity', 'updated_at'])
      .where('trust_id', '=', 'demo-trust')
      .executeTakeFirstOrThrow();
    const impact = await send(admin, `/api/schools/${schools[0]!.id}/removal`, 'GET');
    expect(impact.status).toBe(200);
    expect(impact.body.subscriptionChange).toContain(`from ${schools.length} schools to ${schools.length - 1} schools`);
    // Asking changed nothing: the school and the subscription are as they were.
    expect(await db.selectFrom('schools').select('id').where('trust_id', '=', 'demo-trust').execute()).toHaveLength(
      schools.length,
    );
    expect(
      await db
        .selectFrom('billing_accounts')
        .select(['quantity', 'updated_at'])
        .where('trust_id', '=', 'demo-trust')
        .executeTakeFirstOrThrow(),
    ).toEqual(before);
  });

  it('does not let a viewer remove one, and removes nothing', async () => {
    const viewer = await signIn(DEMO_ACCOUNTS.viewer);
    const school = await db
      .selectFrom('schools')
      .select('id')
      .where('trust_id', '=', 'demo-trust')
      .executeTakeFirstOrThrow();
    const refused = await send(viewer, `/api/schools/${school.id}`, 'DELETE');
    expect(refused.status).toBe(403);
    expect(await db.selectFrom('schools').select('id').where('id', '=', school.id).execute()).toHaveLength(1);
  });
});
