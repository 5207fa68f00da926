import type { Kysely } from 'kysely';
import { z } from 'zod';
import type { Database } from '../../../../db/database';
import { CLIMATE_REGIONS, HEATING_FUELS, SCHOOL_PHASES } from '../../engine/vocabulary';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { badRequest, forbidden } from '../http/errors';
import { SCHOOL_LIMITS } from '../../engine/limits';
import { efficiencyProblem, limited } from '../register/register.schemas';
import { assertWithinPlan } from '../billing/plan-limits';

/** POST /api/schools body. */
export const NewSchoolSchema = z.object({
  name: z.string().trim().min(1, 'name is required').max(200),
  referenceNumber: z.string().trim().min(1).max(50).nullish(),
  phase: z.enum(SCHOOL_PHASES, { message: `phase must be one of: ${SCHOOL_PHASES.join(', ')}` }),
  climateRegion: z.enum(CLIMATE_REGIONS, { message: `climateRegion must be one of: ${CLIMATE_REGIONS.join(', ')}` }),
  address: z.string().trim().max(500).nullish(),
  heatingFuel: z
    .enum(HEATING_FUELS, { message: `heatingFuel must be one of: ${HEATING_FUELS.join(', ')}` })
    .default('gas'),
  fuelPriceGbpPerKwh: limited(SCHOOL_LIMITS.fuelPriceGbpPerKwh).nullish(),
  heatingEfficiency: z.number().min(0.3).max(6).nullish(),
});
export type NewSchoolInput = z.infer<typeof NewSchoolSchema>;

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
