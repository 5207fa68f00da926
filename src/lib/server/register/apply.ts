/**
 * Writes a committed import: schools and blocks through the estate's services (the editors' rules and audit trail),
 * rooms by the fast path: the preview's COPY text streamed into a staging table and applied with a few set-based
 * statements, never row by row. Rooms the file no longer lists are deleted through the estate when asked.
 */
import { type Kysely, sql } from 'kysely';
import type pg from 'pg';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import { bytePieces, copyLines } from '../db/copy';
import { createBlocks, updateBlock } from '../estate/blocks.service';
import { BlockPatchSchema, SchoolPatchSchema } from '../estate/estate.schemas';
import { ROOM_COLUMNS } from '../estate/rooms.repository';
import { deleteRooms } from '../estate/rooms.service';
import { type Actor, createSchools, updateSchool } from '../estate/schools.service';
import type { Ref } from './plan';
import { STAGED_COLUMNS, type StoredPlan } from './staging';

const FROM_IMPORT = ' from a register import';

/** Applies `plan` inside the commit's transaction `trx` (whose connection is `client`); answers the rooms deleted. */
export async function applyPlan(
  trx: Kysely<Database>,
  client: pg.PoolClient,
  trust: ActiveTrust,
  actor: Actor,
  plan: StoredPlan,
  roomLines: Buffer,
  deleteMissing: boolean,
): Promise<{ roomsDeleted: number }> {
  const schoolIds = await writeSchools(trx, trust, actor, plan);
  const blockIds = await writeBlocks(trx, trust, actor, plan, schoolIds);
  if (roomLines.length > 0) await writeRooms(trx, client, trust.id, actor, plan, roomLines, schoolIds, blockIds);
  const missing = plan.missingRooms.map((r) => r.id);
  const roomsDeleted =
    deleteMissing && missing.length > 0
      ? await deleteRooms(trx, trust, actor, missing, ': not in the imported register')
      : 0;
  return { roomsDeleted };
}

/** The schools the plan creates and changes; answers the new schools' ids by their keys. */
async function writeSchools(trx: Kysely<Database>, trust: ActiveTrust, actor: Actor, plan: StoredPlan) {
  const created = await createSchools(
    trx,
    trust,
    actor,
    plan.newSchools.map((s) => ({
      name: s.name,
      phase: s.phase,
      climateRegion: s.climateRegion,
      // The sheet's postcode is kept as the school's address (until someone writes the full one).
      address: s.postcode ?? null,
      heatingFuel: s.heatingFuel ?? 'gas',
      fuelPriceGbpPerKwh: s.fuelPriceGbpPerKwh ?? null,
      heatingEfficiency: s.heatingEfficiency ?? null,
    })),
    FROM_IMPORT,
  );
  for (const c of plan.schoolChanges)
    await updateSchool(trx, trust, actor, c.id, SchoolPatchSchema.parse(c.after), FROM_IMPORT);
  return new Map(plan.newSchools.map((s, i) => [s.key, created[i] as string]));
}

/** The blocks the plan creates and changes; answers the new blocks' ids by their keys. */
async function writeBlocks(
  trx: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  plan: StoredPlan,
  schoolIds: Map<string, string>,
) {
  const toCreate = plan.newBlocks
    .map((b) => ({ b, schoolId: resolve(b.school, schoolIds) }))
    .filter((x): x is { b: (typeof plan.newBlocks)[number]; schoolId: string } => x.schoolId !== null);
  const created = await createBlocks(
    trx,
    trust,
    actor,
    toCreate.map(({ b, schoolId }) => ({
      schoolId,
      name: b.name,
      yearBuilt: b.yearBuilt,
      constructionType: null,
      airPermeabilityM3hM2: b.airPermeabilityM3hM2,
      heatingType: null,
      heatingFuel: b.heatingFuel ?? null,
      fuelPriceGbpPerKwh: b.fuelPriceGbpPerKwh ?? null,
      heatingEfficiency: b.heatingEfficiency ?? null,
      heatingInstalledYear: null,
    })),
    FROM_IMPORT,
  );
  for (const c of plan.blockChanges)
    await updateBlock(trx, trust, actor, c.id, BlockPatchSchema.parse(c.after), FROM_IMPORT);
  return new Map(toCreate.map(({ b }, i) => [b.key, created[i] as string]));
}

const resolve = (ref: Ref, ids: Map<string, string>) => ('id' in ref ? ref.id : (ids.get(ref.newKey) ?? null));

/**
 * The room writes: COPY text from staging.ts into a temporary table, then one INSERT … SELECT for new rooms, one
 * UPDATE … FROM for changed rooms, and their audit events by INSERT … SELECT (an import of 100,000 rooms writes
 * 100,000 of each).
 */
async function writeRooms(
  trx: Kysely<Database>,
  client: pg.PoolClient,
  trustId: string,
  actor: Actor,
  plan: StoredPlan,
  roomLines: Buffer,
  schoolIds: Map<string, string>,
  blockIds: Map<string, string>,
) {
  const roomColumns = ROOM_COLUMNS.map(([c]) => c);
  const columnTypes = ROOM_COLUMNS.map(([c, type]) => `${c} ${type}`).join(', ');
  await sql`CREATE TEMP TABLE import_rows (
      id uuid NOT NULL DEFAULT gen_random_uuid(), row_number int4, room_id uuid, school_id uuid, school_key text, block_id uuid, block_key text,
      ${sql.raw(columnTypes)}, before text, after text
    ) ON COMMIT DROP`.execute(trx);
  await copyLines(client, `COPY import_rows (${STAGED_COLUMNS.join(', ')}) FROM STDIN`, bytePieces(roomLines));
  // Schools and blocks this import created, by the keys the staged rows name them with.
  const created = (ids: Map<string, string>) => sql`unnest(${[...ids.keys()]}::text[], ${[...ids.values()]}::uuid[])`;
  const resolved = sql`import_rows r
    LEFT JOIN ${created(schoolIds)} AS s(key, id) ON s.key = r.school_key
    LEFT JOIN ${created(blockIds)} AS b(key, id) ON b.key = r.block_key`;
  const pick = sql.raw(roomColumns.map((c) => `r.${c}`).join(', '));
  if (plan.summary.roomsToCreate > 0) {
    await sql`INSERT INTO rooms (id, school_id, block_id, ${sql.raw(roomColumns.join(', '))})
      SELECT r.id, coalesce(r.school_id, s.id), coalesce(r.block_id, b.id), ${pick} FROM ${resolved} WHERE r.room_id IS NULL`.execute(
      trx,
    );
    const roomJson = sql.raw(`jsonb_build_object(${ROOM_COLUMNS.map(([c, , key]) => `'${key}', ${c}`).join(', ')})`);
    await sql`INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, after)
      SELECT ${trustId}, ${actor.actorUserId}, ${actor.actorEmail}, 'room.created', 'room', id::text,
        'Created room ' || code || ' from a register import (row ' || row_number || ')', ${roomJson}
      FROM import_rows WHERE room_id IS NULL ORDER BY row_number`.execute(trx);
  }
  if (plan.summary.roomsToChange > 0) {
    // Statistics, so the join to rooms goes by primary key rather than scanning every trust's rooms.
    await sql`ANALYZE import_rows`.execute(trx);
    const assignments = sql.raw(roomColumns.map((c) => `${c} = r.${c}`).join(', '));
    await sql`UPDATE rooms SET block_id = coalesce(r.block_id, b.id), ${assignments}
      FROM ${resolved} WHERE rooms.id = r.room_id`.execute(trx);
    await sql`INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, before, after)
      SELECT ${trustId}, ${actor.actorUserId}, ${actor.actorEmail}, 'room.updated', 'room', room_id::text,
        'Changed room ' || code || ' from a register import (row ' || row_number || ')', before::jsonb, after::jsonb
      FROM import_rows WHERE room_id IS NOT NULL ORDER BY row_number`.execute(trx);
  }
}
