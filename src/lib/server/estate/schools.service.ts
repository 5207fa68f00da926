import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { badRequest, forbidden } from '../http/errors';
import { efficiencyProblem, type NewSchoolInput } from './estate.schemas';
import { assertWithinPlan } from '../billing/plan-limits';

/**
 * Adds a school to the trust, within the plan's limits (402 past the free plan's one school),
 * audited in the same transaction. Members limited to chosen schools cannot add schools.
 */
export async function createSchool(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Pick<AuditEntry, 'actorUserId' | 'actorEmail'>,
  input: NewSchoolInput,
): Promise<{ id: string; name: string }> {
  if (trust.schoolIds) throw forbidden('add schools while your membership is limited to chosen schools');
  const problem = efficiencyProblem(input.heatingFuel, input.heatingEfficiency);
  if (problem) throw badRequest(problem, { field: 'heatingEfficiency' });
  return db.transaction().execute(async (trx) => {
    // Serialise school creation per trust so two requests cannot both pass the plan check.
    await trx.selectFrom('trusts').select('id').where('id', '=', trust.id).forUpdate().executeTakeFirst();
    await assertWithinPlan(trx, trust.id, { schools: 1 });
    const school = await trx
      .insertInto('schools')
      .values({
        trust_id: trust.id,
        name: input.name,
        reference_number: input.referenceNumber ?? null,
        phase: input.phase,
        climate_region: input.climateRegion,
        address: input.address ?? null,
        heating_fuel: input.heatingFuel,
        fuel_price_gbp_per_kwh: input.fuelPriceGbpPerKwh ?? null,
        heating_efficiency: input.heatingEfficiency ?? null,
      })
      .returning(['id', 'name'])
      .executeTakeFirstOrThrow();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'school.created',
      entityType: 'school',
      entityId: school.id,
      summary: `School ${school.name} added`,
      after: input,
    });
    return school;
  });
}
