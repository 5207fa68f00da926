import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_SCHOOLS, demoRooms } from '../../scripts/seed/demo-trust';
import { DEMO_ACCOUNTS, api, signIn } from '../helpers/session';

// Expected values come from the demo scenario definition (scripts/seed/demo-trust.ts), not from the API.
const expectedRooms = DEMO_SCHOOLS.flatMap((school, index) =>
  demoRooms(school, index).map((room) => ({ ...room, school: school.name })),
);

interface RoomsPage {
  rows: {
    id: string;
    code: string;
    schoolName: string;
    floorAreaM2: number;
    pupils: number;
    use: string;
    ventilationType: string;
  }[];
  total: number;
  page: number;
  pageSize: number;
}

describe('estate API', () => {
  let cookie: string;
  beforeAll(async () => {
    cookie = await signIn(DEMO_ACCOUNTS.viewer);
  });
  const getJson = async <T>(path: string) => {
    const response = await api(path, { cookie });
    expect(response.status, `${path} → ${response.status}`).toBe(200);
    return (await response.json()) as T;
  };

  it('reports the database reachable on /api/health', async () => {
    const response = await api('/api/health');
    expect(response.status).toBe(200);
    expect(await response.json()).toEqual({ status: 'ok', database: 'reachable' });
  });

  it('lists every seeded school with its room and pupil counts', async () => {
    const { schools } = await getJson<{
      schools: { name: string; roomCount: number; pupilCount: number; blockCount: number }[];
    }>('/api/schools');
    expect(schools.map((s) => s.name).sort()).toEqual(DEMO_SCHOOLS.map((s) => s.name).sort());
    for (const [index, school] of DEMO_SCHOOLS.entries()) {
      const rooms = demoRooms(school, index);
      const listed = schools.find((s) => s.name === school.name)!;
      expect(listed.roomCount).toBe(rooms.length);
      expect(listed.pupilCount).toBe(rooms.reduce((sum, r) => sum + r.pupils, 0));
      expect(listed.blockCount).toBe(school.blocks.length);
    }
  });

  it('returns one school with its blocks', async () => {
    const { schools } = await getJson<{ schools: { id: string; name: string }[] }>('/api/schools');
    const target = schools.find((s) => s.name === 'Copperwick Academy')!;
    const { school } = await getJson<{ school: { name: string; blocks: { name: string }[] } }>(
      `/api/schools/${target.id}`,
    );
    expect(school.blocks.map((b) => b.name).sort()).toEqual(
      DEMO_SCHOOLS.find((s) => s.name === 'Copperwick Academy')!
        .blocks.map((b) => b.name)
        .sort(),
    );
  });

  it('pages through all rooms without losing or repeating any', async () => {
    const seen = new Set<string>();
    let total = 0;
    for (let page = 1; ; page += 1) {
      const body = await getJson<RoomsPage>(`/api/rooms?page=${page}&pageSize=40&sort=code`);
      total = body.total;
      for (const r of body.rows) seen.add(r.id);
      if (body.rows.length < 40) break;
    }
    expect(total).toBe(expectedRooms.length);
    expect(seen.size).toBe(expectedRooms.length);
  });

  it('sorts rooms by floor area, largest first', async () => {
    const body = await getJson<RoomsPage>('/api/rooms?sort=floorAreaM2&dir=desc&pageSize=5');
    const largest = [...expectedRooms]
      .sort((a, b) => b.floorAreaM2 - a.floorAreaM2)
      .slice(0, 5)
      .map((r) => r.floorAreaM2);
    expect(body.rows.map((r) => r.floorAreaM2)).toEqual(largest);
  });

  it('filters rooms by use and ventilation type', async () => {
    const body = await getJson<RoomsPage>('/api/rooms?use=science_lab&ventilationType=mechanical_extract&pageSize=200');
    const expected = expectedRooms.filter((r) => r.use === 'science_lab' && r.ventilationType === 'mechanical_extract');
    expect(body.total).toBe(expected.length);
    expect(body.rows.every((r) => r.use === 'science_lab' && r.ventilationType === 'mechanical_extract')).toBe(true);
  });

  it('filters rooms by school', async () => {
    const { schools } = await getJson<{ schools: { id: string; name: string }[] }>('/api/schools');
    const school = schools.find((s) => s.name === 'Wrenfield Infant and Nursery School')!;
    const body = await getJson<RoomsPage>(`/api/rooms?schoolId=${school.id}&pageSize=200`);
    expect(body.total).toBe(expectedRooms.filter((r) => r.school === school.name).length);
    expect(new Set(body.rows.map((r) => r.schoolName))).toEqual(new Set([school.name]));
  });

  for (const [query, field] of [
    ['pageSize=1000', 'pageSize'],
    ['page=0', 'page'],
    ['sort=colour', 'sort'],
    ['dir=sideways', 'dir'],
    ['schoolId=not-an-id', 'schoolId'],
    ['ventilationType=open_door', 'ventilationType'],
  ] as const) {
    it(`answers 400 with the error shape for ?${query}`, async () => {
      const response = await api(`/api/rooms?${query}`, { cookie });
      expect(response.status).toBe(400);
      const body = (await response.json()) as { error: { code: string; message: string; details: { path: string }[] } };
      expect(body.error.code).toBe('invalid_request');
      expect(body.error.message).toContain(field);
      expect(body.error.details.map((d) => d.path)).toContain(field);
    });
  }

  it('answers 404 with the error shape for a room id that does not exist', async () => {
    const response = await api('/api/rooms/00000000-0000-4000-8000-000000000000', { cookie });
    expect(response.status).toBe(404);
    expect(await response.json()).toMatchObject({ error: { code: 'not_found' } });
  });
});
