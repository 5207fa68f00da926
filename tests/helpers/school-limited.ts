// A member of the demo trust limited to one school, and data about the other schools that could leak to
// them: an import whose preview lists rooms of every school, a run of another school, and a trust-wide
// run whose problems name a room of another school. Used by the authorisation matrix and its own tests.
import { inflateRawSync } from 'node:zlib';
import type { Kysely } from 'kysely';
import type { Database } from '../../db/database';
import { assess } from './assessments';
import { DEMO_ACCOUNTS, api, signIn, signUp, uniqueEmail } from './session';

export interface SchoolLimitedFixture {
  /** Session of an estates manager limited to `allowedSchoolId`. */
  cookie: string;
  email: string;
  allowedSchoolId: string;
  /** A school the member may not see, with one of its rooms. */
  otherSchoolId: string;
  otherRoomId: string;
  /** Previewed by the trust admin: its missing rooms span every school. */
  foreignImportId: string;
  /** A run of `otherSchoolId`. */
  otherSchoolRunId: string;
  /** A trust-wide run with a problem naming a room of `otherSchoolId`. */
  trustRunId: string;
  /** Ids and names of the other schools, their blocks and rooms: none may ever reach the member. */
  forbidden: string[];
  /** Removes the room added to make the problem. */
  cleanup(): Promise<void>;
}

async function json<T>(response: Response, expected: number): Promise<T> {
  const text = await response.text();
  if (response.status !== expected) throw new Error(`Expected ${expected}, got ${response.status}: ${text}`);
  return JSON.parse(text) as T;
}

/** Starts a run as the trust admin and waits until it has finished; throws when it fails or takes too long. */
const finishedRun = (admin: string, body: object): Promise<string> => assess(admin, body, 120_000);

export async function schoolLimitedFixture(db: Kysely<Database>): Promise<SchoolLimitedFixture> {
  const admin = await signIn(DEMO_ACCOUNTS.trust_admin);
  const schools = await db
    .selectFrom('schools')
    .select(['id', 'name'])
    .where('trust_id', '=', 'demo-trust')
    .orderBy('name')
    .execute();
  const [other, allowed] = schools;
  if (!other || !allowed) throw new Error('The demo trust needs two schools');

  const email = uniqueEmail('one-school');
  const { invitation } = await json<{ invitation: { id: string } }>(
    await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email, role: 'estates_manager', schoolIds: [allowed.id] }),
    }),
    201,
  );
  const cookie = await signUp({ name: 'One School Manager', email, invitationId: invitation.id });
  // A pending invitation limited to the other school: the member list would name that school's id.
  await json(
    await api('/api/members', {
      method: 'POST',
      cookie: admin,
      body: JSON.stringify({ email: uniqueEmail('other-school'), role: 'viewer', schoolIds: [other.id] }),
    }),
    201,
  );

  // A room the engine cannot assess. The register and the engine share one set of limits (limits.ts), so no
  // stored register value can be refused; the room gets a stored calibration with a negative infiltration flow,
  // which the engine's calibration check refuses (EngineInputError naming the field).
  const otherRoom = await db
    .selectFrom('rooms')
    .selectAll()
    .where('school_id', '=', other.id)
    .orderBy('code')
    .executeTakeFirstOrThrow();
  const { id: problemRoomId } = await db
    .insertInto('rooms')
    .values({
      school_id: other.id,
      block_id: otherRoom.block_id,
      code: `LEAK-${email.slice(11, 19)}`,
      name: 'Sports hall with a corrupt calibration',
      use: 'classroom',
      floor_area_m2: 3000,
      ceiling_height_m: 6,
      pupils: 30,
      adults: 2,
      age_group: otherRoom.age_group,
      glazing_area_m2: 20,
      openable_area_m2: 5,
      ventilation_type: otherRoom.ventilation_type,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('room_calibrations')
    .values({
      trust_id: 'demo-trust',
      room_id: problemRoomId,
      version: 1,
      status: 'active',
      days_used: 10,
      label: 'calibrated from 10 days of readings (version 1)',
      calibration: JSON.stringify({ windowUseFactor: {}, infiltrationLps: -1, label: 'calibrated (corrupt)' }),
      fit: JSON.stringify({}),
      assumptions_version: 'test',
    })
    .execute();

  // One new room per school: the preview lists every existing room of every school as missing.
  const lines = ['School,School phase,Room code,Floor area (m2),Ceiling height (m),Pupils'];
  for (const s of schools) lines.push(`${s.name},Primary,NEW-${email.slice(11, 19)},50,2.7,30`);
  const form = new FormData();
  form.append('file', new Blob([lines.join('\n')]), 'whole trust.csv');
  const preview = await json<{ id: string }>(
    await api('/api/imports', { method: 'POST', cookie: admin, body: form }),
    201,
  );

  const otherSchoolRunId = await finishedRun(admin, { scope: 'school', schoolId: other.id });
  const trustRunId = await finishedRun(admin, { scope: 'trust' });

  const otherSchoolIds = schools.filter((s) => s.id !== allowed.id).map((s) => s.id);
  const blocks = await db.selectFrom('blocks').select(['id', 'name', 'school_id']).execute();
  // A name that is part of a name the member may see (another school's "Teaching Block" inside their
  // "Main Teaching Block") proves nothing: only ids and names of the other schools alone count.
  const allowedNames = [allowed.name, ...blocks.filter((b) => b.school_id === allowed.id).map((b) => b.name)];
  const ownText = (name: string) => allowedNames.some((n) => n.includes(name));
  const otherBlocks = blocks.filter((b) => otherSchoolIds.includes(b.school_id));
  const otherRooms = await db.selectFrom('rooms').select('id').where('school_id', 'in', otherSchoolIds).execute();
  const forbidden = [
    ...schools.filter((s) => s.id !== allowed.id).flatMap((s) => [s.id, s.name]),
    ...otherBlocks.flatMap((b) => (ownText(b.name) ? [b.id] : [b.id, b.name])),
    ...otherRooms.map((r) => r.id),
  ];
  return {
    cookie,
    email,
    allowedSchoolId: allowed.id,
    otherSchoolId: other.id,
    otherRoomId: otherRoom.id,
    foreignImportId: preview.id,
    otherSchoolRunId,
    trustRunId,
    forbidden,
    async cleanup() {
      await db.deleteFrom('rooms').where('id', '=', problemRoomId).execute();
    },
  };
}

/** The text of a response body: every XML part of an .xlsx, or the body itself. */
export async function bodyText(response: Response): Promise<string> {
  const bytes = Buffer.from(await response.arrayBuffer());
  if (bytes.readUInt32LE(0) !== 0x04034b50) return bytes.toString('utf8');
  // An .xlsx: walk its local headers (streamed archives carry their sizes in the central directory).
  const parts: string[] = [];
  const eocd = bytes.lastIndexOf(Buffer.from([0x50, 0x4b, 0x05, 0x06]));
  let p = bytes.readUInt32LE(eocd + 16);
  for (let n = bytes.readUInt16LE(eocd + 10); n > 0; n--) {
    const method = bytes.readUInt16LE(p + 10);
    const size = bytes.readUInt32LE(p + 20);
    const local = bytes.readUInt32LE(p + 42);
    const start = local + 30 + bytes.readUInt16LE(local + 26) + bytes.readUInt16LE(local + 28);
    const raw = bytes.subarray(start, start + size);
    parts.push((method === 8 ? inflateRawSync(raw) : raw).toString('utf8'));
    p += 46 + bytes.readUInt16LE(p + 28) + bytes.readUInt16LE(p + 30) + bytes.readUInt16LE(p + 32);
  }
  return parts.join('\n');
}

/** The forbidden values that appear in `text` (none, for a well-scoped answer). */
export const leaked = (text: string, forbidden: string[]) => forbidden.filter((f) => text.includes(f));
