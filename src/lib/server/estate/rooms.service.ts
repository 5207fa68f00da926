/** Adding, changing and deleting rooms one at a time or many at once; every change checked as an imported row is. */
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { assertWithinPlan } from '../billing/plan-limits';
import { inTransaction } from '../db/transaction';
import { notFound } from '../http/errors';
import { forgetRankState } from '../portfolio/ranking.repository';
import { blockIsInSchool } from './blocks.repository';
import { type FieldProblem, physicalChecks } from './checks';
import { blockNotInSchool, invalidRoom, roomChangedSince } from './estate.errors';
import { type RoomBulk, type RoomCreate, type RoomFields, RoomFieldsSchema, type RoomPatch } from './estate.schemas';
import type { Some } from './estate.types';
import { deleteRoomRows, insertRoom, lockRooms, updateRooms } from './rooms.repository';
import { findSchool } from './schools.repository';
import type { Actor } from './schools.service';

/** Refuses a room that fails the same checks as an import row; returns its warnings otherwise. */
export function checkRoom(room: RoomFields): FieldProblem[] {
  const problems = physicalChecks(room);
  const errors = problems.filter((p) => p.severity === 'error');
  if (errors.length) throw invalidRoom(errors);
  return problems.filter((p) => p.severity === 'warning');
}

async function assertBlockOfSchool(db: Kysely<Database>, schoolId: string, blockId: string | null | undefined) {
  if (blockId && !(await blockIsInSchool(db, schoolId, blockId))) throw blockNotInSchool();
}

/** Adds a room to a school of the trust (plan limits apply); answers its id and any warnings. */
export async function createRoom(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, input: RoomCreate) {
  const { schoolId, blockId, ...fields } = input;
  const warnings = checkRoom(fields);
  return inTransaction(db, async (trx) => {
    if (!(await findSchool(trx, trust, schoolId))) throw notFound('That school');
    await assertBlockOfSchool(trx, schoolId, blockId);
    await assertWithinPlan(trx, trust.id, { rooms: 1 });
    const id = await insertRoom(trx, { schoolId, blockId }, fields);
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
  return inTransaction(db, async (trx) => {
    const [room] = await lockRooms(trx, trust, [id]);
    if (!room) throw notFound('That room');
    if (ifUnmodifiedSince && room.updatedAt.toISOString() !== new Date(ifUnmodifiedSince).toISOString()) {
      throw roomChangedSince();
    }
    const current = room.fields;
    const next = RoomFieldsSchema.parse({ ...current, ...changes });
    const warnings = checkRoom(next);
    if (blockId !== undefined) await assertBlockOfSchool(trx, room.schoolId, blockId);
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const key of Object.keys(changes) as (keyof RoomFields)[]) {
      if (current[key] !== next[key]) {
        before[key] = current[key];
        after[key] = next[key];
      }
    }
    if (blockId !== undefined && blockId !== room.blockId) {
      before.blockId = room.blockId;
      after.blockId = blockId;
    }
    if (Object.keys(after).length) {
      const changed = Object.fromEntries(Object.entries(after).filter(([k]) => k !== 'blockId'));
      await updateRooms(trx, [id], changed as Some<RoomFields>, blockId);
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

/**
 * Deletes rooms of the trust, all or none (404 when any is not the trust's); audited with what each held. `origin`
 * ends each audit summary.
 */
export async function deleteRooms(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  ids: readonly string[],
  origin = '',
): Promise<number> {
  const count = await inTransaction(db, async (trx) => {
    const rooms = await lockRooms(trx, trust, ids);
    if (rooms.length !== new Set(ids).size)
      throw notFound(ids.length === 1 ? 'That room' : 'One or more of those rooms');
    const count = await deleteRoomRows(trx, ids);
    await recordAudit(
      trx,
      rooms.map((r) => ({
        trustId: trust.id,
        ...actor,
        action: 'room.deleted',
        entityType: 'room',
        entityId: r.id,
        summary: `Deleted room ${r.fields.code}${origin}`,
        before: r.fields,
      })),
    );
    return count;
  });
  // The database marked the trust's ranks stale; this process's last look at them is stale too.
  forgetRankState(trust.id);
  return count;
}

/** Deletes a room of the trust. */
export async function deleteRoom(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, id: string): Promise<void> {
  await deleteRooms(db, trust, actor, [id]);
}

/** Applies one change to many rooms (or deletes them) in one transaction: all or none. */
export async function bulkRooms(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, input: RoomBulk) {
  if (input.action === 'delete') {
    const count = await deleteRooms(db, trust, actor, input.ids, ' (bulk)');
    return { count, warnings: [] as { id: string; code: string; message: string }[] };
  }
  return inTransaction(db, async (trx) => {
    const rooms = await lockRooms(trx, trust, input.ids);
    if (rooms.length !== new Set(input.ids).size) throw notFound('One or more of those rooms');
    const { blockId, ...changes } = input.changes;
    const warnings: { id: string; code: string; message: string }[] = [];
    const audit: AuditEntry[] = [];
    for (const r of rooms) {
      const next = RoomFieldsSchema.parse({ ...r.fields, ...changes });
      const problems = physicalChecks(next);
      const errors = problems.filter((p) => p.severity === 'error');
      if (errors.length) throw invalidRoom(errors, { id: r.id, code: r.fields.code });
      for (const w of problems) warnings.push({ id: r.id, code: r.fields.code, message: w.message });
      if (blockId !== undefined) await assertBlockOfSchool(trx, r.schoolId, blockId);
      audit.push({
        trustId: trust.id,
        ...actor,
        action: 'room.updated',
        entityType: 'room',
        entityId: r.id,
        summary: `Changed room ${r.fields.code} (bulk)`,
        after: input.changes,
      });
    }
    await updateRooms(trx, input.ids, changes, blockId);
    await recordAudit(trx, audit);
    return { count: rooms.length, warnings };
  });
}
