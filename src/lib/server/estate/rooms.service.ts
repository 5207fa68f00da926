import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { assertWithinPlan } from '../billing/plan-limits';
import { inTrustScope } from './estate.repository';
import { AppError, badRequest, conflict, notFound } from '../http/errors';
import {
  physicalChecks,
  RoomFieldsSchema,
  type BlockCreate,
  type BlockPatch,
  type FieldProblem,
  type RoomBulk,
  type RoomCreate,
  type RoomFields,
  type RoomPatch,
  type SchoolPatch,
  efficiencyProblem,
} from './estate.schemas';
import { roomFieldsOf } from './rooms.repository';

type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** Room fields → rooms table columns. */
function roomColumns(f: { [K in keyof RoomFields]?: RoomFields[K] | undefined }) {
  const c: Record<string, unknown> = {};
  if (f.code !== undefined) c.code = f.code;
  if (f.name !== undefined) c.name = f.name;
  if (f.use !== undefined) c.use = f.use;
  if (f.floorAreaM2 !== undefined) c.floor_area_m2 = f.floorAreaM2;
  if (f.ceilingHeightM !== undefined) c.ceiling_height_m = f.ceilingHeightM;
  if (f.pupils !== undefined) c.pupils = f.pupils;
  if (f.adults !== undefined) c.adults = f.adults;
  if (f.ageGroup !== undefined) c.age_group = f.ageGroup;
  if (f.orientationDeg !== undefined) c.orientation_deg = f.orientationDeg;
  if (f.glazingAreaM2 !== undefined) c.glazing_area_m2 = f.glazingAreaM2;
  if (f.openableAreaM2 !== undefined) c.openable_area_m2 = f.openableAreaM2;
  if (f.windowType !== undefined) c.window_type = f.windowType;
  if (f.frameMaterial !== undefined) c.frame_material = f.frameMaterial;
  if (f.glazingGValue !== undefined) c.glazing_g_value = f.glazingGValue;
  if (f.ventilationType !== undefined) c.ventilation_type = f.ventilationType;
  if (f.mechanicalSupplyLps !== undefined) c.mechanical_supply_lps = f.mechanicalSupplyLps;
  if (f.winterWindowOpenFraction !== undefined) c.winter_window_open_fraction = f.winterWindowOpenFraction;
  if (f.notes !== undefined) c.notes = f.notes;
  return c;
}

/** Refuses a room that fails the same checks as an import row; returns its warnings otherwise. */
export function checkRoom(room: RoomFields): FieldProblem[] {
  const problems = physicalChecks(room);
  const errors = problems.filter((p) => p.severity === 'error');
  if (errors.length) throw new AppError(400, 'invalid_room', errors.map((e) => e.message).join(' '), errors);
  return problems.filter((p) => p.severity === 'warning');
}

async function schoolInScope(db: Kysely<Database> | Transaction<Database>, trust: ActiveTrust, schoolId: string) {
  const school = await db
    .selectFrom('schools')
    .select(['id', 'name'])
    .where(inTrustScope(trust))
    .where('schools.id', '=', schoolId)
    .executeTakeFirst();
  if (!school) throw notFound('That school');
  return school;
}

async function blockOfSchool(
  db: Kysely<Database> | Transaction<Database>,
  schoolId: string,
  blockId: string | null | undefined,
) {
  if (!blockId) return;
  const block = await db
    .selectFrom('blocks')
    .select('id')
    .where('id', '=', blockId)
    .where('school_id', '=', schoolId)
    .executeTakeFirst();
  if (!block) throw badRequest("That block is not part of the room's school.");
}

async function roomInScope(db: Kysely<Database> | Transaction<Database>, trust: ActiveTrust, id: string, lock = false) {
  let q = db
    .selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .selectAll('rooms')
    .where(inTrustScope(trust))
    .where('rooms.id', '=', id);
  if (lock) q = q.forUpdate();
  const room = await q.executeTakeFirst();
  if (!room) throw notFound('That room');
  return room;
}

/** Adds a room to a school of the trust (plan limits apply); answers its id and any warnings. */
export async function createRoom(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, input: RoomCreate) {
  const { schoolId, blockId, ...fields } = input;
  const warnings = checkRoom(fields);
  return db.transaction().execute(async (trx) => {
    await schoolInScope(trx, trust, schoolId);
    await blockOfSchool(trx, schoolId, blockId);
    await assertWithinPlan(trx, trust.id, { rooms: 1 });
    const { id } = await trx
      .insertInto('rooms')
      .values({ school_id: schoolId, block_id: blockId, ...roomColumns(fields) } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'room.created',
      entityType: 'room',
      entityId: id,
      summary: `Created room ${fields.code}`,
      after: input,
    });
    return { id, warnings };
  });
}

/** Changes some of a room's attributes after checking the whole room as the import would. */
export async function updateRoom(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, id: string, patch: RoomPatch) {
  const { blockId, ifUnmodifiedSince, ...changes } = patch;
  return db.transaction().execute(async (trx) => {
    const row = await roomInScope(trx, trust, id, true);
    if (ifUnmodifiedSince && row.updated_at.toISOString() !== new Date(ifUnmodifiedSince).toISOString()) {
      throw conflict(
        'Someone else changed this room since you opened it. Reload to see their change, then edit again.',
      );
    }
    const current = roomFieldsOf(row);
    const next = RoomFieldsSchema.parse({ ...current, ...changes });
    const warnings = checkRoom(next);
    if (blockId !== undefined) await blockOfSchool(trx, row.school_id, blockId);
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const key of Object.keys(changes) as (keyof RoomFields)[]) {
      if (current[key] !== next[key]) {
        before[key] = current[key];
        after[key] = next[key];
      }
    }
    if (blockId !== undefined && blockId !== row.block_id) {
      before.blockId = row.block_id;
      after.blockId = blockId;
    }
    if (Object.keys(after).length) {
      await trx
        .updateTable('rooms')
        .set({ ...roomColumns(after as Partial<RoomFields>), ...(blockId !== undefined ? { block_id: blockId } : {}) })
        .where('id', '=', id)
        .execute();
      await recordAudit(trx, {
        trustId: trust.id,
        ...actor,
        action: 'room.updated',
        entityType: 'room',
        entityId: id,
        summary: `Changed room ${next.code}`,
        before,
        after,
      });
    }
    return { id, warnings, changed: Object.keys(after) };
  });
}

/** Deletes a room of the trust. */
export async function deleteRoom(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, id: string): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const row = await roomInScope(trx, trust, id, true);
    await trx.deleteFrom('rooms').where('id', '=', id).execute();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'room.deleted',
      entityType: 'room',
      entityId: id,
      summary: `Deleted room ${row.code}`,
      before: roomFieldsOf(row),
    });
  });
}

/** Applies one change to many rooms (or deletes them) in one transaction: all or none. */
export async function bulkRooms(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, input: RoomBulk) {
  return db.transaction().execute(async (trx) => {
    const rows = await trx
      .selectFrom('rooms')
      .innerJoin('schools', 'schools.id', 'rooms.school_id')
      .selectAll('rooms')
      .where(inTrustScope(trust))
      .where('rooms.id', 'in', input.ids)
      .forUpdate()
      .execute();
    if (rows.length !== new Set(input.ids).size) throw notFound('One or more of those rooms');
    const audit: AuditEntry[] = [];
    if (input.action === 'delete') {
      await trx.deleteFrom('rooms').where('id', 'in', input.ids).execute();
      for (const r of rows)
        audit.push({
          trustId: trust.id,
          ...actor,
          action: 'room.deleted',
          entityType: 'room',
          entityId: r.id,
          summary: `Deleted room ${r.code} (bulk)`,
          before: roomFieldsOf(r),
        });
      await recordAudit(trx, audit);
      return { count: rows.length, warnings: [] as { id: string; code: string; message: string }[] };
    }
    const { blockId, ...changes } = input.changes;
    const warnings: { id: string; code: string; message: string }[] = [];
    for (const r of rows) {
      const current = roomFieldsOf(r);
      const next = RoomFieldsSchema.parse({ ...current, ...changes });
      const problems = physicalChecks(next);
      const errors = problems.filter((p) => p.severity === 'error');
      if (errors.length)
        throw new AppError(
          400,
          'invalid_room',
          `Room ${r.code}: ${errors.map((e) => e.message).join(' ')} Nothing was changed.`,
          { roomId: r.id, problems: errors },
        );
      for (const w of problems) warnings.push({ id: r.id, code: r.code, message: w.message });
      if (blockId !== undefined) await blockOfSchool(trx, r.school_id, blockId);
      audit.push({
        trustId: trust.id,
        ...actor,
        action: 'room.updated',
        entityType: 'room',
        entityId: r.id,
        summary: `Changed room ${r.code} (bulk)`,
        after: input.changes,
      });
    }
    await trx
      .updateTable('rooms')
      .set({ ...roomColumns(changes), ...(blockId !== undefined ? { block_id: blockId } : {}) })
      .where('id', 'in', input.ids)
      .execute();
    await recordAudit(trx, audit);
    return { count: rows.length, warnings };
  });
}

/** Changes a school's attributes. */
export async function updateSchool(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  patch: SchoolPatch,
) {
  return db.transaction().execute(async (trx) => {
    const school = await trx
      .selectFrom('schools')
      .selectAll('schools')
      .where(inTrustScope(trust))
      .where('schools.id', '=', id)
      .forUpdate()
      .executeTakeFirst();
    if (!school) throw notFound('That school');
    const set: Record<string, unknown> = {};
    if (patch.name !== undefined) set.name = patch.name;
    if (patch.referenceNumber !== undefined) set.reference_number = patch.referenceNumber;
    if (patch.phase !== undefined) set.phase = patch.phase;
    if (patch.climateRegion !== undefined) set.climate_region = patch.climateRegion;
    if (patch.address !== undefined) set.address = patch.address;
    if (patch.heatingFuel !== undefined) set.heating_fuel = patch.heatingFuel;
    if (patch.fuelPriceGbpPerKwh !== undefined) set.fuel_price_gbp_per_kwh = patch.fuelPriceGbpPerKwh;
    if (patch.heatingEfficiency !== undefined) set.heating_efficiency = patch.heatingEfficiency;
    if (patch.timetable !== undefined)
      set.timetable = patch.timetable === null ? null : JSON.stringify(patch.timetable);
    const problem = efficiencyProblem(
      (set.heating_fuel as string | undefined) ?? school.heating_fuel,
      patch.heatingEfficiency !== undefined ? patch.heatingEfficiency : school.heating_efficiency,
    );
    if (problem) throw badRequest(problem, { field: 'heatingEfficiency' });
    if (Object.keys(set).length === 0) return { id };
    await trx.updateTable('schools').set(set).where('id', '=', id).execute();
    const before = Object.fromEntries(Object.keys(set).map((k) => [k, (school as Record<string, unknown>)[k]]));
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'school.updated',
      entityType: 'school',
      entityId: id,
      summary: `Changed school ${school.name}`,
      before,
      after: set,
    });
    return { id };
  });
}

function blockColumns(p: BlockPatch) {
  const set: Record<string, unknown> = {};
  if (p.name !== undefined) set.name = p.name;
  if (p.yearBuilt !== undefined) set.year_built = p.yearBuilt;
  if (p.constructionType !== undefined) set.construction_type = p.constructionType;
  if (p.airPermeabilityM3hM2 !== undefined) set.air_permeability_m3h_m2 = p.airPermeabilityM3hM2;
  if (p.heatingType !== undefined) set.heating_type = p.heatingType;
  if (p.heatingFuel !== undefined) set.heating_fuel = p.heatingFuel;
  if (p.fuelPriceGbpPerKwh !== undefined) set.fuel_price_gbp_per_kwh = p.fuelPriceGbpPerKwh;
  if (p.heatingEfficiency !== undefined) set.heating_efficiency = p.heatingEfficiency;
  if (p.heatingInstalledYear !== undefined) set.heating_installed_year = p.heatingInstalledYear;
  return set;
}

/** Refuses an efficiency that does not fit the block's fuel (its own, else the school's). */
async function checkBlockEfficiency(
  trx: Transaction<Database>,
  schoolId: string,
  fuel: string | null,
  efficiency: number | null | undefined,
): Promise<void> {
  if (efficiency === null || efficiency === undefined) return;
  const school = await trx.selectFrom('schools').select('heating_fuel').where('id', '=', schoolId).executeTakeFirst();
  const problem = efficiencyProblem(fuel ?? school?.heating_fuel ?? 'gas', efficiency);
  if (problem) throw badRequest(problem, { field: 'heatingEfficiency' });
}

/** Adds a block to a school of the trust. */
export async function createBlock(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, input: BlockCreate) {
  return db.transaction().execute(async (trx) => {
    await schoolInScope(trx, trust, input.schoolId);
    const { schoolId, ...rest } = input;
    await checkBlockEfficiency(trx, schoolId, rest.heatingFuel, rest.heatingEfficiency);
    const { id } = await trx
      .insertInto('blocks')
      .values({ school_id: schoolId, ...blockColumns(rest) } as never)
      .returning('id')
      .executeTakeFirstOrThrow();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'block.created',
      entityType: 'block',
      entityId: id,
      summary: `Created block ${input.name}`,
      after: input,
    });
    return { id };
  });
}

async function blockInScope(trx: Transaction<Database>, trust: ActiveTrust, id: string) {
  const block = await trx
    .selectFrom('blocks')
    .innerJoin('schools', 'schools.id', 'blocks.school_id')
    .selectAll('blocks')
    .where(inTrustScope(trust))
    .where('blocks.id', '=', id)
    .forUpdate()
    .executeTakeFirst();
  if (!block) throw notFound('That block');
  return block;
}

/** Changes a block's attributes. */
export async function updateBlock(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  patch: BlockPatch,
) {
  return db.transaction().execute(async (trx) => {
    const block = await blockInScope(trx, trust, id);
    const set = blockColumns(patch);
    await checkBlockEfficiency(
      trx,
      block.school_id,
      patch.heatingFuel !== undefined ? patch.heatingFuel : block.heating_fuel,
      patch.heatingEfficiency !== undefined ? patch.heatingEfficiency : block.heating_efficiency,
    );
    if (Object.keys(set).length === 0) return { id };
    await trx.updateTable('blocks').set(set).where('id', '=', id).execute();
    const before = Object.fromEntries(Object.keys(set).map((k) => [k, (block as Record<string, unknown>)[k]]));
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'block.updated',
      entityType: 'block',
      entityId: id,
      summary: `Changed block ${block.name}`,
      before,
      after: set,
    });
    return { id };
  });
}

/** Deletes a block; its rooms stay in the school without a block. */
export async function deleteBlock(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, id: string): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const block = await blockInScope(trx, trust, id);
    const moved = await trx
      .updateTable('rooms')
      .set({ block_id: null })
      .where('block_id', '=', id)
      .returning('id')
      .execute();
    await trx.deleteFrom('blocks').where('id', '=', id).execute();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'block.deleted',
      entityType: 'block',
      entityId: id,
      summary: `Deleted block ${block.name}; ${moved.length} rooms now have no block`,
      before: block,
    });
  });
}
