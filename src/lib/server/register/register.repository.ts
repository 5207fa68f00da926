import { sql, type Kysely, type Transaction } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ClimateRegion, SchoolPhase } from '../../engine/vocabulary';
import type { AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { inTrustScope } from '../estate/estate.repository';
import type { RegisterField } from './columns';
import type { SavedMappings } from './headers';
import type { EstateSnapshot, ImportPlan, Ref } from './plan';
import type { RoomFields } from './register.schemas';

type Db = Kysely<Database> | Transaction<Database>;
type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** Room columns in the order the bulk writer sends them. */
const ROOM_COLUMNS = [
  ['code', 'text', 'code'], ['name', 'text', 'name'], ['use', 'text', 'use'], ['floor_area_m2', 'float8', 'floorAreaM2'],
  ['ceiling_height_m', 'float8', 'ceilingHeightM'], ['pupils', 'int4', 'pupils'], ['adults', 'int4', 'adults'], ['age_group', 'text', 'ageGroup'],
  ['orientation_deg', 'int4', 'orientationDeg'], ['glazing_area_m2', 'float8', 'glazingAreaM2'], ['openable_area_m2', 'float8', 'openableAreaM2'],
  ['window_type', 'text', 'windowType'], ['ventilation_type', 'text', 'ventilationType'], ['mechanical_supply_lps', 'float8', 'mechanicalSupplyLps'],
  ['notes', 'text', 'notes'],
] as const satisfies readonly (readonly [string, string, keyof RoomFields])[];

/** Database row → the room's register fields. */
export function roomFieldsOf(r: {
  code: string; name: string; use: string; floor_area_m2: number; ceiling_height_m: number; pupils: number; adults: number; age_group: string;
  orientation_deg: number | null; glazing_area_m2: number; openable_area_m2: number; window_type: string | null; ventilation_type: string;
  mechanical_supply_lps: number | null; notes: string | null;
}): RoomFields {
  return {
    code: r.code, name: r.name, use: r.use as RoomFields['use'], floorAreaM2: r.floor_area_m2, ceilingHeightM: r.ceiling_height_m,
    pupils: r.pupils, adults: r.adults, ageGroup: r.age_group as RoomFields['ageGroup'], orientationDeg: r.orientation_deg,
    glazingAreaM2: r.glazing_area_m2, openableAreaM2: r.openable_area_m2, windowType: r.window_type as RoomFields['windowType'],
    ventilationType: r.ventilation_type as RoomFields['ventilationType'], mechanicalSupplyLps: r.mechanical_supply_lps, notes: r.notes,
  };
}

/** The trust's schools, blocks and rooms as the import compares against them. */
export async function loadSnapshot(db: Db, trust: ActiveTrust): Promise<EstateSnapshot> {
  const schools = await db.selectFrom('schools').select(['id', 'name', 'phase', 'climate_region']).where(inTrustScope(trust)).execute();
  const ids = schools.map((s) => s.id);
  const blocks = ids.length ? await db.selectFrom('blocks').selectAll().where('school_id', 'in', ids).execute() : [];
  const rooms = ids.length ? await db.selectFrom('rooms').selectAll().where('school_id', 'in', ids).execute() : [];
  const regionCounts = new Map<string, number>();
  for (const s of schools) regionCounts.set(s.climate_region, (regionCounts.get(s.climate_region) ?? 0) + 1);
  const defaultClimateRegion = ([...regionCounts].sort((a, b) => b[1] - a[1])[0]?.[0] ?? 'midlands') as ClimateRegion;
  return {
    schools: schools.map((s) => ({ id: s.id, name: s.name, phase: s.phase as SchoolPhase })),
    blocks: blocks.map((b) => ({ id: b.id, schoolId: b.school_id, name: b.name, yearBuilt: b.year_built, airPermeabilityM3hM2: b.air_permeability_m3h_m2 })),
    rooms: rooms.map((r) => ({ id: r.id, schoolId: r.school_id, blockId: r.block_id, fields: roomFieldsOf(r) })),
    defaultClimateRegion,
    canCreateSchools: trust.schoolIds === null,
  };
}

/**
 * A cheap fingerprint of the trust's estate: how many schools, blocks and rooms, and when each
 * last changed. Any insert, update or delete since the preview changes it.
 */
export async function estateFingerprint(db: Db, trust: ActiveTrust): Promise<string> {
  const { rows } = await sql<{ f: string }>`
    SELECT concat_ws('|',
      (SELECT count(*) || '@' || coalesce(max(updated_at)::text, '') FROM schools WHERE ${inTrustScope(trust)}),
      (SELECT count(*) || '@' || coalesce(max(b.updated_at)::text, '') FROM blocks b JOIN schools ON schools.id = b.school_id WHERE ${inTrustScope(trust)}),
      (SELECT count(*) || '@' || coalesce(max(r.updated_at)::text, '') FROM rooms r JOIN schools ON schools.id = r.school_id WHERE ${inTrustScope(trust)})
    ) AS f`.execute(db);
  return rows[0]?.f ?? '';
}

/** The trust's remembered header → field mappings. */
export async function loadSavedMappings(db: Db, trustId: string): Promise<SavedMappings> {
  const rows = await db.selectFrom('register_column_mappings').select(['header_key', 'field']).where('trust_id', '=', trustId).execute();
  return new Map(rows.map((r) => [r.header_key, r.field as RegisterField]));
}

/** Remembers the user's mapping of these headers for the trust's next import. */
export async function saveMappings(db: Db, trustId: string, pairs: { headerKey: string; field: RegisterField }[]): Promise<void> {
  const values = pairs.filter((p) => p.headerKey !== '').map((p) => ({ trust_id: trustId, header_key: p.headerKey, field: p.field }));
  if (!values.length) return;
  await db.insertInto('register_column_mappings').values(values)
    .onConflict((oc) => oc.columns(['trust_id', 'header_key']).doUpdateSet({ field: (eb) => eb.ref('excluded.field'), updated_at: sql`now()` }))
    .execute();
}

const AUDIT_CHUNK = 5000;
const ROOM_CHUNK = 5000;

/** Writes an import plan: new schools and blocks, school and block changes, rooms upserted in bulk, all audited. */
export async function applyPlan(
  trx: Transaction<Database>, trustId: string, actor: Actor, plan: ImportPlan, deleteMissing: boolean,
): Promise<{ roomsDeleted: number }> {
  const audit: AuditEntry[] = [];
  const base = { trustId, ...actor };
  const schoolIds = new Map<string, string>();
  const blockIds = new Map<string, string>();
  const resolve = (ref: Ref, ids: Map<string, string>) => ('id' in ref ? ref.id : ids.get(ref.newKey) ?? null);

  if (plan.newSchools.length) {
    const created = await trx.insertInto('schools')
      .values(plan.newSchools.map((s) => ({ trust_id: trustId, name: s.name, phase: s.phase, climate_region: s.climateRegion })))
      .returning(['id', 'name']).execute();
    const idByName = new Map(created.map((r) => [r.name, r.id]));
    for (const s of plan.newSchools) {
      const id = idByName.get(s.name) ?? null;
      if (id) schoolIds.set(s.key, id);
      audit.push({ ...base, action: 'school.created', entityType: 'school', entityId: id, summary: `Created school ${s.name} from a register import`, after: s });
    }
  }
  for (const c of plan.schoolChanges) {
    await trx.updateTable('schools').set({ phase: c.after.phase }).where('id', '=', c.id).execute();
    audit.push({ ...base, action: 'school.updated', entityType: 'school', entityId: c.id, summary: `Changed the phase of ${c.name}`, before: c.before, after: c.after });
  }
  const blocksToCreate = plan.newBlocks.map((b) => ({ b, schoolId: resolve(b.school, schoolIds) })).filter((x) => x.schoolId);
  if (blocksToCreate.length) {
    const created = await trx.insertInto('blocks')
      .values(blocksToCreate.map(({ b, schoolId }) => ({ school_id: schoolId as string, name: b.name, year_built: b.yearBuilt, air_permeability_m3h_m2: b.airPermeabilityM3hM2 })))
      .returning(['id', 'school_id', 'name']).execute();
    const idByKey = new Map(created.map((r) => [`${r.school_id}|${r.name}`, r.id]));
    for (const { b, schoolId } of blocksToCreate) {
      const id = idByKey.get(`${schoolId}|${b.name}`) ?? null;
      if (id) blockIds.set(b.key, id);
      audit.push({ ...base, action: 'block.created', entityType: 'block', entityId: id, summary: `Created block ${b.name} from a register import`, after: b });
    }
  }
  for (const c of plan.blockChanges) {
    await trx.updateTable('blocks').set({
      ...(c.after.yearBuilt !== undefined ? { year_built: c.after.yearBuilt } : {}),
      ...(c.after.airPermeabilityM3hM2 !== undefined ? { air_permeability_m3h_m2: c.after.airPermeabilityM3hM2 } : {}),
    }).where('id', '=', c.id).execute();
    audit.push({ ...base, action: 'block.updated', entityType: 'block', entityId: c.id, summary: `Changed block ${c.name}`, before: c.before, after: c.after });
  }

  // Rooms: new ones by a plain multi-row INSERT, changed ones by one UPDATE … FROM per chunk; the
  // columns travel as arrays (unnest), never row by row.
  const keys = ROOM_COLUMNS.map(([, , key]) => key);
  const typed = (values: unknown[], type: string) => sql`${values}::${sql.raw(type)}[]`;
  const creates = plan.roomWrites.filter((w) => !w.roomId);
  const updates = plan.roomWrites.filter((w) => w.roomId);
  // New rooms and their audit events in one statement per chunk: each new room's id is drawn up
  // front, so the room and its room.created event are both written from the same source row
  // (the values travel only once, and no join back from the inserted rows is needed).
  const roomJson = sql.raw(`jsonb_build_object(${ROOM_COLUMNS.map(([c, , key]) => `'${key}', src.${c}`).join(', ')})`);
  for (let start = 0; start < creates.length; start += ROOM_CHUNK) {
    const chunk = creates.slice(start, start + ROOM_CHUNK);
    const args = [
      typed(chunk.map((w) => w.rowNumber), 'int4'),
      typed(chunk.map((w) => resolve(w.school, schoolIds)), 'uuid'),
      typed(chunk.map((w) => (w.block ? resolve(w.block, blockIds) : null)), 'uuid'),
      ...ROOM_COLUMNS.map(([, type], i) => typed(chunk.map((w) => w.fields[keys[i]!]), type)),
    ];
    const columns = ['school_id', 'block_id', ...ROOM_COLUMNS.map(([c]) => c)].join(', ');
    await sql`
      WITH src AS MATERIALIZED (SELECT gen_random_uuid() AS id, * FROM unnest(${sql.join(args)}) AS u(row_number, ${sql.raw(columns)})),
      ins AS (INSERT INTO rooms (id, ${sql.raw(columns)}) SELECT id, ${sql.raw(columns)} FROM src)
      INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, after)
      SELECT ${trustId}, ${actor.actorUserId}, ${actor.actorEmail}, 'room.created', 'room', src.id::text,
        'Created room ' || src.code || ' from a register import (row ' || src.row_number || ')', ${roomJson}
      FROM src`.execute(trx);
  }
  for (let start = 0; start < updates.length; start += ROOM_CHUNK) {
    const chunk = updates.slice(start, start + ROOM_CHUNK);
    const args = [
      typed(chunk.map((w) => w.roomId), 'uuid'),
      typed(chunk.map((w) => (w.block ? resolve(w.block, blockIds) : null)), 'uuid'),
      ...ROOM_COLUMNS.map(([, type], i) => typed(chunk.map((w) => w.fields[keys[i]!]), type)),
    ];
    const names = ['id', 'block_id', ...ROOM_COLUMNS.map(([c]) => c)];
    const assignments = sql.raw(names.slice(1).map((c) => `${c} = u.${c}`).join(', '));
    await sql`UPDATE rooms SET ${assignments} FROM unnest(${sql.join(args)}) AS u(${sql.raw(names.join(', '))}) WHERE rooms.id = u.id`.execute(trx);
    for (const w of chunk) {
      audit.push({ ...base, action: 'room.updated', entityType: 'room', entityId: w.roomId, summary: `Changed room ${w.fields.code} from a register import (row ${w.rowNumber})`, before: w.before, after: w.after });
    }
  }

  let roomsDeleted = 0;
  if (deleteMissing && plan.missingRooms.length) {
    const ids = plan.missingRooms.map((r) => r.id);
    const deleted = await trx.deleteFrom('rooms').where('id', 'in', ids).returning(['id', 'code']).execute();
    roomsDeleted = deleted.length;
    for (const r of plan.missingRooms) {
      audit.push({ ...base, action: 'room.deleted', entityType: 'room', entityId: r.id, summary: `Deleted room ${r.code} of ${r.schoolName}: not in the imported register`, before: r });
    }
  }
  for (let start = 0; start < audit.length; start += AUDIT_CHUNK) await recordAuditInBulk(trx, audit.slice(start, start + AUDIT_CHUNK));
  return { roomsDeleted };
}

/**
 * The same rows recordAudit writes, sent as column arrays in one statement: an import of
 * 100,000 rooms writes 100,000 audit events, and this keeps that to a few round trips.
 */
async function recordAuditInBulk(trx: Transaction<Database>, entries: AuditEntry[]): Promise<void> {
  if (entries.length === 0) return;
  const col = <T>(f: (e: AuditEntry) => T) => entries.map(f);
  const json = (v: unknown) => (v === undefined ? null : JSON.stringify(v));
  await sql`INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, before, after)
    SELECT t, u, e, a, et, ei, s, b::jsonb, af::jsonb FROM unnest(
      ${col((e) => e.trustId)}::text[], ${col((e) => e.actorUserId)}::text[], ${col((e) => e.actorEmail)}::text[], ${col((e) => e.action)}::text[],
      ${col((e) => e.entityType)}::text[], ${col((e) => e.entityId)}::text[], ${col((e) => e.summary)}::text[],
      ${col((e) => json(e.before))}::text[], ${col((e) => json(e.after))}::text[]
    ) AS x(t, u, e, a, et, ei, s, b, af)`.execute(trx);
}

/** Every room of the trust as a register record, ordered by school, block and room code (for export). */
export async function listRegisterRecords(db: Db, trust: ActiveTrust): Promise<import('./workbook').RegisterRecord[]> {
  const rows = await db.selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .leftJoin('blocks', 'blocks.id', 'rooms.block_id')
    .where(inTrustScope(trust))
    .selectAll('rooms')
    .select(['schools.name as school_name', 'schools.phase as school_phase', 'blocks.name as block_name', 'blocks.year_built', 'blocks.air_permeability_m3h_m2'])
    .orderBy('schools.name').orderBy('blocks.name').orderBy('rooms.code')
    .execute();
  return rows.map((r) => ({
    school: r.school_name, schoolPhase: r.school_phase, block: r.block_name, yearBuilt: r.year_built, code: r.code, name: r.name, use: r.use,
    floorAreaM2: r.floor_area_m2, ceilingHeightM: r.ceiling_height_m, pupils: r.pupils, adults: r.adults, ageGroup: r.age_group,
    orientationDeg: r.orientation_deg, glazingAreaM2: r.glazing_area_m2, openableAreaM2: r.openable_area_m2, windowType: r.window_type,
    ventilationType: r.ventilation_type, mechanicalSupplyLps: r.mechanical_supply_lps, airPermeabilityM3hM2: r.air_permeability_m3h_m2, notes: r.notes,
  }));
}
