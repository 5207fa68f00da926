import type { Kysely } from 'kysely';
import { z } from 'zod';
import type { Database } from '../../../../db/database';
import { CLIMATE_REGIONS, HEATING_FUELS, SCHOOL_PHASES } from '../../engine/vocabulary';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { forbidden } from '../http/errors';
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
  fuelPriceGbpPerKwh: z.number().positive().lt(5).nullish(),
  boilerEfficiency: z.number().gt(0).max(1).nullish(),
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
        boiler_efficiency: input.boilerEfficiency ?? null,
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
