/** Adding, changing and deleting blocks: the one place a block is written, by the editors and the import alike. */
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { inTransaction } from '../db/transaction';
import { notFound } from '../http/errors';
import { deleteBlockRow, insertBlocks, lockBlock, updateBlockRow } from './blocks.repository';
import { efficiencyProblem } from './checks';
import { efficiencyDoesNotFit } from './estate.errors';
import type { BlockCreate, BlockPatch } from './estate.schemas';
import type { BlockFields } from './estate.types';
import { detachRoomsFromBlock } from './rooms.repository';
import { findSchool } from './schools.repository';
import type { Actor } from './schools.service';

/**
 * Adds blocks to schools of the trust, audited in the same transaction; answers their ids in the order given. A
 * block's efficiency must fit its own fuel, else its school's. `origin` ends each audit summary.
 */
export async function createBlocks(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  inputs: readonly BlockCreate[],
  origin = '',
): Promise<string[]> {
  if (inputs.length === 0) return [];
  return inTransaction(db, async (trx) => {
    const fuelOf = new Map<string, string>();
    for (const input of inputs) {
      if (!fuelOf.has(input.schoolId)) {
        const school = await findSchool(trx, trust, input.schoolId);
        if (!school) throw notFound('That school');
        fuelOf.set(input.schoolId, school.heatingFuel);
      }
      const fuel = input.heatingFuel ?? fuelOf.get(input.schoolId) ?? 'gas';
      const problem = efficiencyProblem(fuel, input.heatingEfficiency);
      if (problem) throw efficiencyDoesNotFit(problem);
    }
    const ids = await insertBlocks(trx, inputs);
    await recordAudit(
      trx,
      inputs.map((input, i) => ({
        trustId: trust.id,
        ...actor,
        action: 'block.created',
        entityType: 'block',
        entityId: ids[i] ?? null,
        summary: `Created block ${input.name}${origin}`,
        after: input,
      })),
    );
    return ids;
  });
}

/** Adds one block to a school of the trust (see createBlocks). */
export async function createBlock(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  input: BlockCreate,
): Promise<{ id: string }> {
  const [id] = await createBlocks(db, trust, actor, [input]);
  return { id: id as string };
}

/** Changes a block's attributes; the efficiency must fit the block's fuel, else its school's. */
export async function updateBlock(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  patch: BlockPatch,
  origin = '',
): Promise<{ id: string }> {
  return inTransaction(db, async (trx) => {
    const block = await lockBlock(trx, trust, id);
    if (!block) throw notFound('That block');
    const efficiency = patch.heatingEfficiency !== undefined ? patch.heatingEfficiency : block.heatingEfficiency;
    if (efficiency !== null) {
      const ownFuel = patch.heatingFuel !== undefined ? patch.heatingFuel : block.heatingFuel;
      const fuel = ownFuel ?? (await findSchool(trx, trust, block.schoolId))?.heatingFuel ?? 'gas';
      const problem = efficiencyProblem(fuel, efficiency);
      if (problem) throw efficiencyDoesNotFit(problem);
    }
    const keys = (Object.keys(patch) as (keyof BlockFields)[]).filter((k) => patch[k] !== undefined);
    if (keys.length === 0) return { id };
    await updateBlockRow(trx, id, patch);
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'block.updated',
      entityType: 'block',
      entityId: id,
      summary: `Changed block ${block.name}${origin}`,
      before: Object.fromEntries(keys.map((k) => [k, block[k]])),
      after: Object.fromEntries(keys.map((k) => [k, patch[k]])),
    });
    return { id };
  });
}

/** Deletes a block; its rooms stay in the school without a block. */
export async function deleteBlock(db: Kysely<Database>, trust: ActiveTrust, actor: Actor, id: string): Promise<void> {
  await inTransaction(db, async (trx) => {
    const block = await lockBlock(trx, trust, id);
    if (!block) throw notFound('That block');
    const moved = await detachRoomsFromBlock(trx, id);
    await deleteBlockRow(trx, id);
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'block.deleted',
      entityType: 'block',
      entityId: id,
      summary: `Deleted block ${block.name}; ${moved} rooms now have no block`,
      before: block,
    });
  });
}
