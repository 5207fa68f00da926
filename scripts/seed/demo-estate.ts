import type { Kysely } from 'kysely';
import type { Database } from '../../db/database';
import { recordAudit } from '../../src/lib/server/audit/audit.repository';
import { insertBlocks } from '../../src/lib/server/estate/blocks.repository';
import { insertRooms } from '../../src/lib/server/estate/rooms.repository';
import { insertSchools } from '../../src/lib/server/estate/schools.repository';
import { TimetableTextSchema } from '../../src/lib/server/estate/timetable';
import { DEMO_SCHOOLS, DEMO_TRUST, demoRooms } from './demo-trust';

/**
 * Writes the demo trust, its schools, blocks and rooms in one transaction, through the estate's repositories (the
 * same row mapping as every other write; no plan limits or per-record audit: the whole estate is one 'seed' event).
 * Idempotent: returns false without writing when the demo trust already exists.
 */
export async function seedDemoEstate(db: Kysely<Database>): Promise<boolean> {
  const existing = await db.selectFrom('trusts').select('id').where('id', '=', DEMO_TRUST.id).executeTakeFirst();
  if (existing) return false;
  await db.transaction().execute(async (trx) => {
    await trx.insertInto('trusts').values(DEMO_TRUST).execute();
    const schoolIds = await insertSchools(
      trx,
      DEMO_TRUST.id,
      DEMO_SCHOOLS.map((school) => ({
        name: school.name,
        referenceNumber: school.referenceNumber,
        phase: school.phase,
        climateRegion: school.climateRegion,
        address: school.address,
        heatingFuel: school.heatingFuel,
        fuelPriceGbpPerKwh: school.fuelPriceGbpPerKwh,
        heatingEfficiency: school.heatingEfficiency,
        timetable: school.timetable === null ? null : TimetableTextSchema.parse(school.timetable),
      })),
    );
    for (const [index, school] of DEMO_SCHOOLS.entries()) {
      const schoolId = schoolIds[index] as string;
      const blockIds = await insertBlocks(
        trx,
        school.blocks.map((block) => ({
          schoolId,
          name: block.name,
          yearBuilt: block.yearBuilt,
          constructionType: block.constructionType,
          airPermeabilityM3hM2: block.airPermeabilityM3hM2,
          heatingType: block.heatingType,
          heatingFuel: block.heatingFuel,
          heatingInstalledYear: block.heatingInstalledYear,
          fuelPriceGbpPerKwh: block.fuelPriceGbpPerKwh ?? null,
          heatingEfficiency: block.heatingEfficiency ?? null,
        })),
      );
      const blockIdByName = new Map(school.blocks.map((block, i) => [block.name, blockIds[i] as string]));
      await insertRooms(
        trx,
        demoRooms(school, index).map(({ blockName, ...room }) => ({
          schoolId,
          blockId: blockIdByName.get(blockName) ?? null,
          fields: { ...room, winterWindowOpenFraction: null },
        })),
      );
    }
    await recordAudit(trx, {
      trustId: DEMO_TRUST.id,
      actorUserId: null,
      actorEmail: null,
      action: 'seed',
      entityType: 'trust',
      entityId: DEMO_TRUST.id,
      summary: 'Demo estate created',
    });
  });
  return true;
}
