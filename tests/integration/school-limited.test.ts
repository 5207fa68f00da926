// A member limited to one school sees no other school anywhere (issue 17, item 4): the answers that
// used to leak, and every page of the app, searched for the other schools' ids and names.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { bodyText, leaked, schoolLimitedFixture, type SchoolLimitedFixture } from '../helpers/school-limited';
import { sql } from 'kysely';
import { DEMO_ACCOUNTS, api, signIn, signUp, uniqueEmail } from '../helpers/session';

const db = testDb();
let f: SchoolLimitedFixture;
let admin = '';
beforeAll(async () => {
  f = await schoolLimitedFixture(db);
  admin = await signIn(DEMO_ACCOUNTS.trust_admin);
}, 300_000);
afterAll(async () => {
  await f?.cleanup();
  await db.destroy();
});

type RunView = { id: string; scope: string; schoolId: string | null; problems: { roomId: string }[] };
type RunCounts = { roomsTotal: number; roomsDone: number };

describe('a member limited to one school', () => {
  it("gets 404 for the trust admin's import, whose missing rooms span every school", async () => {
    const asAdmin = (await (await api(`/api/imports/${f.foreignImportId}`, { cookie: admin })).json()) as {
      import: { missingRooms: { schoolName: string }[] };
    };
    // The fixture is what it says: rooms of several schools are listed as missing.
    expect(new Set(asAdmin.import.missingRooms.map((m) => m.schoolName)).size).toBeGreaterThan(1);
    expect((await api(`/api/imports/${f.foreignImportId}`, { cookie: f.cookie })).status).toBe(404);
    const list = await api('/api/imports', { cookie: f.cookie });
    expect(((await list.json()) as { imports: { id: string }[] }).imports.map((i) => i.id)).not.toContain(
      f.foreignImportId,
    );
  });

  it('sees only their own school among the missing rooms of their own import', async () => {
    const school = await db
      .selectFrom('schools')
      .select('name')
      .where('id', '=', f.allowedSchoolId)
      .executeTakeFirstOrThrow();
    const form = new FormData();
    const csv = `School,School phase,Room code,Floor area (m2),Ceiling height (m),Pupils\n${school.name},Primary,ONLY-ONE,50,2.7,30\n`;
    form.append('file', new Blob([csv]), 'my school.csv');
    const preview = await api('/api/imports', { method: 'POST', cookie: f.cookie, body: form });
    expect(preview.status).toBe(201);
    const { id } = (await preview.json()) as { id: string };
    const detail = await api(`/api/imports/${id}`, { cookie: f.cookie });
    const text = await detail.text();
    expect(leaked(text, f.forbidden)).toEqual([]);
    const { import: mine } = JSON.parse(text) as { import: { missingRooms: { schoolName: string }[] } };
    expect(mine.missingRooms.length).toBeGreaterThan(0);
    expect(new Set(mine.missingRooms.map((m) => m.schoolName))).toEqual(new Set([school.name]));
    await api(`/api/imports/${id}/commit`, {
      method: 'POST',
      cookie: f.cookie,
      body: JSON.stringify({ rows: 'none' }),
    });
  });

  it("sees no run of another school, and no problem naming another school's room", async () => {
    const asAdmin = (await (await api(`/api/assessments/${f.trustRunId}`, { cookie: admin })).json()) as RunView;
    const otherRooms = new Set(f.forbidden);
    // The fixture's trust-wide run has a problem naming a room of the other school.
    expect(asAdmin.problems.some((p) => otherRooms.has(p.roomId))).toBe(true);
    const mine = await api(`/api/assessments/${f.trustRunId}`, { cookie: f.cookie });
    expect(mine.status).toBe(200);
    expect(leaked(await mine.text(), f.forbidden)).toEqual([]);
    expect((await api(`/api/assessments/${f.otherSchoolRunId}`, { cookie: f.cookie })).status).toBe(404);
    const { runs } = (await (await api('/api/assessments?limit=50', { cookie: f.cookie })).json()) as {
      runs: RunView[];
    };
    expect(runs.map((r) => r.id)).toContain(f.trustRunId);
    expect(runs.map((r) => r.id)).not.toContain(f.otherSchoolRunId);
    expect(runs.every((r) => r.schoolId === null || r.schoolId === f.allowedSchoolId)).toBe(true);
  });

  it('counts only the rooms of their own school in a trust-wide run', async () => {
    const asAdmin = (await (await api(`/api/assessments/${f.trustRunId}`, { cookie: admin })).json()) as RunCounts;
    const mine = (await (await api(`/api/assessments/${f.trustRunId}`, { cookie: f.cookie })).json()) as RunCounts;
    // Counted here from the rooms of the member's school, not from the run.
    const own = await db
      .selectFrom('rooms')
      .select((e) => e.fn.countAll<string>().as('n'))
      .where('school_id', '=', f.allowedSchoolId)
      .executeTakeFirstOrThrow();
    expect(Number(own.n)).toBeGreaterThan(0);
    expect(asAdmin.roomsTotal).toBeGreaterThan(Number(own.n));
    expect(mine.roomsTotal).toBe(Number(own.n));
    expect(mine.roomsDone).toBe(Number(own.n));
    const { runs } = (await (await api('/api/assessments?limit=50', { cookie: f.cookie })).json()) as {
      runs: (RunView & RunCounts)[];
    };
    expect(runs.find((r) => r.id === f.trustRunId)?.roomsTotal).toBe(Number(own.n));
  });

  it.each([
    ['/app'],
    ['/app/schools'],
    ['/app/register'],
    ['/app/assessments'],
    ['/app/priorities'],
    ['/app/finance'],
    ['/app/settings'],
    ['/app/settings/members'],
    ['/app/settings/assumptions'],
    ['/app/account'],
  ])('sees no other school on the page %s', async (path) => {
    const page = await api(path, { cookie: f.cookie });
    expect(page.status).toBe(200);
    expect(leaked(await bodyText(page), f.forbidden)).toEqual([]);
  });

  it("gets no page for another school or another school's room", async () => {
    for (const [path, id] of [
      [`/app/schools/${f.otherSchoolId}`, f.otherSchoolId],
      [`/app/rooms/${f.otherRoomId}`, f.otherRoomId],
    ] as const) {
      const page = await api(path, { cookie: f.cookie });
      expect(page.status, path).toBe(404);
      // The page may repeat the address asked for; it says nothing else about the other school.
      expect(
        leaked(
          await bodyText(page),
          f.forbidden.filter((x) => x !== id),
        ),
      ).toEqual([]);
    }
    // The trust admin does get them (the ids are real).
    expect((await api(`/app/schools/${f.otherSchoolId}`, { cookie: admin })).status).toBe(200);
  });
});

describe('what applies to the whole trust', () => {
  it('is not for a member limited to one school: assumptions, unit catalogue, ranking weights, new schools', async () => {
    const before = await db
      .selectFrom('assumption_sets')
      .select((eb) => eb.fn.countAll<string>().as('n'))
      .where('trust_id', '=', 'demo-trust')
      .executeTakeFirstOrThrow();
    const weightsBefore = await (await api('/api/priorities/weights', { cookie: admin })).json();
    const attempts: [string, string, object][] = [
      ['PATCH', '/api/assumptions', { changes: [{ path: 'air.outdoorCo2Ppm', value: 430 }] }],
      ['PUT', '/api/priorities/weights', { risk: 0.6, costEffectiveness: 0.2, payback: 0.2 }],
      ['POST', '/api/schools', { name: 'Limited Member Annexe', phase: 'primary', climateRegion: 'midlands' }],
    ];
    for (const [method, path, body] of attempts) {
      const response = await api(path, { method, cookie: f.cookie, body: JSON.stringify(body) });
      expect(response.status, path).toBe(403);
      const { error } = (await response.json()) as { error: { code: string; message: string } };
      expect(error.code, path).toBe('limited_to_schools');
      expect(error.message, path).toMatch(/limited to some schools/);
    }
    const after = await db
      .selectFrom('assumption_sets')
      .select((eb) => eb.fn.countAll<string>().as('n'))
      .where('trust_id', '=', 'demo-trust')
      .executeTakeFirstOrThrow();
    expect(after.n).toBe(before.n);
    expect(await (await api('/api/priorities/weights', { cookie: admin })).json()).toEqual(weightsBefore);
    const annexe = await db.selectFrom('schools').select('id').where('name', '=', 'Limited Member Annexe').execute();
    expect(annexe).toEqual([]);
  });

  it('is not offered on the pages: assumptions read-only with the reason, no trust-wide re-run', async () => {
    const assumptions = await bodyText(await api('/app/settings/assumptions', { cookie: f.cookie }));
    expect(assumptions).toContain('Your access is limited to some schools');
    const asManager = await bodyText(
      await api('/app/settings/assumptions', { cookie: await signIn(DEMO_ACCOUNTS.estates_manager) }),
    );
    expect(asManager).not.toContain('Your access is limited to some schools');
    const finance = await bodyText(await api('/app/finance', { cookie: f.cookie }));
    expect(finance).not.toContain('Re-run assessment');
    expect(await bodyText(await api('/app/finance', { cookie: admin }))).toContain('Re-run assessment');
  });
});

describe('a trust admin limited to one school', () => {
  let limitedAdmin = '';
  beforeAll(async () => {
    const email = uniqueEmail('one-school-admin');
    const invite = await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email, role: 'trust_admin', schoolIds: [f.allowedSchoolId] }),
    });
    expect(invite.status, await invite.clone().text()).toBe(201);
    const { invitation } = (await invite.json()) as { invitation: { id: string } };
    limitedAdmin = await signUp({ name: 'One School Admin', email, invitationId: invitation.id });
    // Inviting needs a confirmed address.
    await sql`UPDATE "user" SET "emailVerified" = true WHERE email = ${email}`.execute(db);
  }, 120_000);

  const invite = (body: object) =>
    api('/api/members', { method: 'POST', cookie: limitedAdmin, body: JSON.stringify(body) });

  it('invites people only to their own school', async () => {
    for (const body of [
      { email: uniqueEmail('everywhere'), role: 'viewer' },
      { email: uniqueEmail('other-school'), role: 'viewer', schoolIds: [f.otherSchoolId] },
      { email: uniqueEmail('both'), role: 'viewer', schoolIds: [f.allowedSchoolId, f.otherSchoolId] },
    ]) {
      const response = await invite(body);
      expect(response.status, JSON.stringify(body)).toBe(403);
      expect(((await response.json()) as { error: { code: string } }).error.code).toBe('limited_to_schools');
    }
    const own = await invite({ email: uniqueEmail('own-school'), role: 'viewer', schoolIds: [f.allowedSchoolId] });
    expect(own.status, await own.clone().text()).toBe(201);
  });

  it('cannot change or remove a member who sees every school, nor manage billing', async () => {
    const viewerMember = 'demo-user-viewer-member';
    const change = await api(`/api/members/${viewerMember}`, {
      method: 'PATCH',
      cookie: limitedAdmin,
      body: JSON.stringify({ schoolIds: [f.allowedSchoolId] }),
    });
    expect(change.status).toBe(403);
    const removal = await api(`/api/members/${viewerMember}`, { method: 'DELETE', cookie: limitedAdmin });
    expect(removal.status).toBe(403);
    const still = await db.selectFrom('member').select('id').where('id', '=', viewerMember).execute();
    expect(still).toHaveLength(1);
    const limits = await db
      .selectFrom('membership_limits')
      .select('limited_to_schools')
      .where('member_id', '=', viewerMember)
      .execute();
    expect(limits.every((l) => !l.limited_to_schools)).toBe(true);
    const billing = await api('/api/billing', { cookie: limitedAdmin });
    expect(billing.status).toBe(403);
  });
});
