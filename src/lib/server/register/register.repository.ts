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
  ['code', 'text'], ['name', 'text'], ['use', 'text'], ['floor_area_m2', 'float8'], ['ceiling_height_m', 'float8'], ['pupils', 'int4'],
  ['adults', 'int4'], ['age_group', 'text'], ['orientation_deg', 'int4'], ['glazing_area_m2', 'float8'], ['openable_area_m2', 'float8'],
  ['window_type', 'text'], ['ventilation_type', 'text'], ['mechanical_supply_lps', 'float8'], ['notes', 'text'],
] as const;

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
  };
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

  for (const s of plan.newSchools) {
    const { id } = await trx.insertInto('schools').values({ trust_id: trustId, name: s.name, phase: s.phase, climate_region: s.climateRegion })
      .returning('id').executeTakeFirstOrThrow();
    schoolIds.set(s.key, id);
    audit.push({ ...base, action: 'school.created', entityType: 'school', entityId: id, summary: `Created school ${s.name} from a register import`, after: s });
  }
  for (const c of plan.schoolChanges) {
    await trx.updateTable('schools').set({ phase: c.after.phase }).where('id', '=', c.id).execute();
    audit.push({ ...base, action: 'school.updated', entityType: 'school', entityId: c.id, summary: `Changed the phase of ${c.name}`, before: c.before, after: c.after });
  }
  for (const b of plan.newBlocks) {
    const schoolId = resolve(b.school, schoolIds);
    if (!schoolId) continue;
    const { id } = await trx.insertInto('blocks')
      .values({ school_id: schoolId, name: b.name, year_built: b.yearBuilt, air_permeability_m3h_m2: b.airPermeabilityM3hM2 })
      .returning('id').executeTakeFirstOrThrow();
    blockIds.set(b.key, id);
    audit.push({ ...base, action: 'block.created', entityType: 'block', entityId: id, summary: `Created block ${b.name} from a register import`, after: b });
  }
  for (const c of plan.blockChanges) {
    await trx.updateTable('blocks').set({
      ...(c.after.yearBuilt !== undefined ? { year_built: c.after.yearBuilt } : {}),
      ...(c.after.airPermeabilityM3hM2 !== undefined ? { air_permeability_m3h_m2: c.after.airPermeabilityM3hM2 } : {}),
    }).where('id', '=', c.id).execute();
    audit.push({ ...base, action: 'block.updated', entityType: 'block', entityId: c.id, summary: `Changed block ${c.name}`, before: c.before, after: c.after });
  }

  // Rooms: one INSERT … ON CONFLICT per chunk, the columns sent as arrays (unnest), not row by row.
  for (let start = 0; start < plan.roomWrites.length; start += ROOM_CHUNK) {
    const chunk = plan.roomWrites.slice(start, start + ROOM_CHUNK);
    const arrays: unknown[][] = [chunk.map((w) => resolve(w.school, schoolIds)), chunk.map((w) => (w.block ? resolve(w.block, blockIds) : null))];
    const keys: (keyof RoomFields)[] = ['code', 'name', 'use', 'floorAreaM2', 'ceilingHeightM', 'pupils', 'adults', 'ageGroup', 'orientationDeg',
      'glazingAreaM2', 'openableAreaM2', 'windowType', 'ventilationType', 'mechanicalSupplyLps', 'notes'];
    for (const key of keys) arrays.push(chunk.map((w) => w.fields[key]));
    const columnList = sql.raw(['school_id', 'block_id', ...ROOM_COLUMNS.map(([c]) => c)].join(', '));
    const unnestArgs = sql.join(arrays.map((values, i) => {
      const type = i === 0 || i === 1 ? 'uuid' : ROOM_COLUMNS[i - 2]?.[1] ?? 'text';
      return sql`${values}::${sql.raw(type)}[]`;
    }));
    const updates = sql.raw(['block_id', ...ROOM_COLUMNS.map(([c]) => c)].filter((c) => c !== 'code').map((c) => `${c} = excluded.${c}`).join(', '));
    const rows = await sql<{ id: string; code: string; school_id: string }>`
      INSERT INTO rooms (${columnList}) SELECT * FROM unnest(${unnestArgs})
      ON CONFLICT (school_id, code) DO UPDATE SET ${updates}
      RETURNING id, code, school_id`.execute(trx);
    const idByKey = new Map(rows.rows.map((r) => [`${r.school_id}|${r.code}`, r.id]));
    for (const w of chunk) {
      const id = idByKey.get(`${resolve(w.school, schoolIds)}|${w.fields.code}`) ?? w.roomId;
      audit.push(w.roomId
        ? { ...base, action: 'room.updated', entityType: 'room', entityId: id, summary: `Changed room ${w.fields.code} from a register import (row ${w.rowNumber})`, before: w.before, after: w.after }
        : { ...base, action: 'room.created', entityType: 'room', entityId: id, summary: `Created room ${w.fields.code} from a register import (row ${w.rowNumber})`, after: w.fields });
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
