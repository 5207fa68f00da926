/** Adding and changing schools: the one place a school is written, by the editors and by the register import alike. */
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { assertWithinPlan } from '../billing/plan-limits';
import { inTransaction } from '../db/transaction';
import { notFound } from '../http/errors';
import { forgetRankState } from '../portfolio/ranking.repository';
import { efficiencyProblem } from './checks';
import { efficiencyDoesNotFit, schoolRemovalLimited, schoolsLimited } from './estate.errors';
import type { SchoolCreate, SchoolPatch } from './estate.schemas';
import type { SchoolFields } from './estate.types';
import {
  countSchoolDependants,
  deleteSchoolRow,
  findSchool,
  insertSchools,
  lockTrustForNewSchools,
  type SchoolRemovalImpact,
  updateSchoolRow,
} from './schools.repository';

/** Who writes, for the audit trail. */
export type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/**
 * Adds schools to the trust, within the plan's limits (402 past the free plan's one school), audited in the same
 * transaction; answers their ids in the order given. Members limited to chosen schools cannot add schools. `origin`
 * ends each audit summary (e.g. ' from a register import').
 */
export async function createSchools(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  inputs: readonly SchoolCreate[],
  origin = '',
): Promise<string[]> {
  if (inputs.length === 0) return [];
  if (trust.schoolIds) throw schoolsLimited();
  for (const input of inputs) {
    const problem = efficiencyProblem(input.heatingFuel, input.heatingEfficiency);
    if (problem) throw efficiencyDoesNotFit(problem);
  }
  return inTransaction(db, async (trx) => {
    await lockTrustForNewSchools(trx, trust.id);
    await assertWithinPlan(trx, trust.id, { schools: inputs.length });
    const ids = await insertSchools(trx, trust.id, inputs);
    await recordAudit(
      trx,
      inputs.map((input, i) => ({
        trustId: trust.id,
        ...actor,
        action: 'school.created',
        entityType: 'school',
        entityId: ids[i] ?? null,
        summary: `Created school ${input.name}${origin}`,
        after: input,
      })),
    );
    return ids;
  });
}

/** Adds one school (see createSchools); answers its id and name. */
export async function createSchool(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  input: SchoolCreate,
): Promise<{ id: string; name: string }> {
  const [id] = await createSchools(db, trust, actor, [input]);
  return { id: id as string, name: input.name };
}

/** Changes a school's attributes; the efficiency must fit the fuel the school will have. */
export async function updateSchool(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
  patch: SchoolPatch,
  origin = '',
): Promise<{ id: string }> {
  return inTransaction(db, async (trx) => {
    const school = await findSchool(trx, trust, id, true);
    if (!school) throw notFound('That school');
    const problem = efficiencyProblem(
      patch.heatingFuel ?? school.heatingFuel,
      patch.heatingEfficiency !== undefined ? patch.heatingEfficiency : school.heatingEfficiency,
    );
    if (problem) throw efficiencyDoesNotFit(problem);
    const keys = (Object.keys(patch) as (keyof SchoolFields)[]).filter((k) => patch[k] !== undefined);
    if (keys.length === 0) return { id };
    await updateSchoolRow(trx, id, patch);
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'school.updated',
      entityType: 'school',
      entityId: id,
      summary: `Changed school ${school.name}${origin}`,
      before: Object.fromEntries(keys.map((k) => [k, school[k]])),
      after: Object.fromEntries(keys.map((k) => [k, patch[k]])),
    });
    return { id };
  });
}

/** What removing a school takes with it, for the confirmation (404 outside the member's scope). */
export async function schoolRemovalImpact(
  db: Kysely<Database>,
  trust: ActiveTrust,
  id: string,
): Promise<SchoolRemovalImpact & { name: string }> {
  const school = await findSchool(db, trust, id);
  if (!school) throw notFound('That school');
  return { name: school.name, ...(await countSchoolDependants(db, id)) };
}

/**
 * Removes a school with its blocks, rooms, results and readings, audited in the same transaction with what went.
 * Members limited to chosen schools cannot remove schools. After it the trust has one school fewer: the caller tells
 * billing (followSchoolCount), as after adding one.
 */
export async function deleteSchool(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  id: string,
): Promise<SchoolRemovalImpact & { name: string }> {
  if (trust.schoolIds) throw schoolRemovalLimited();
  const removed = await inTransaction(db, async (trx) => {
    await lockTrustForNewSchools(trx, trust.id);
    const school = await findSchool(trx, trust, id, true);
    if (!school) throw notFound('That school');
    const impact = await countSchoolDependants(trx, id);
    await deleteSchoolRow(trx, id);
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'school.deleted',
      entityType: 'school',
      entityId: id,
      summary: `Removed school ${school.name} with ${impact.blocks} blocks and ${impact.rooms} rooms`,
      before: { ...school, ...impact },
    });
    return { name: school.name, ...impact };
  });
  // The database marked the trust's ranks stale; this process's last look at them is stale too.
  forgetRankState(trust.id);
  return removed;
}
