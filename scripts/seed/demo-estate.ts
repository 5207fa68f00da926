import type { Kysely } from 'kysely';
import type { Database } from '../../db/database';
import { DEMO_SCHOOLS, DEMO_TRUST, demoRooms } from './demo-trust';

/** "09:00-10:00 lesson" lines as the stored timetable (a seed may not import app code). */
function parseTimetableLines(text: string) {
  return text.split('\n').map((line, i) => {
    const [span = '', kind = 'lesson'] = line.split(' ');
    const [start = '', end = ''] = span.split('-');
    const minute = (hhmm: string) => Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3, 5));
    return {
      label: kind === 'lesson' ? `Lesson ${i + 1}` : kind,
      kind,
      startMinute: minute(start),
      endMinute: minute(end),
      occupancyFraction: kind === 'lesson' ? 1 : 0,
    };
  });
}

/**
 * Writes the demo trust, its schools, blocks and rooms in one transaction.
 * Idempotent: returns false without writing when the demo trust already exists.
 */
export async function seedDemoEstate(db: Kysely<Database>): Promise<boolean> {
  const existing = await db.selectFrom('trusts').select('id').where('id', '=', DEMO_TRUST.id).executeTakeFirst();
  if (existing) return false;
  await db.transaction().execute(async (trx) => {
    await trx.insertInto('trusts').values(DEMO_TRUST).execute();
    for (const [index, school] of DEMO_SCHOOLS.entries()) {
      const { id: schoolId } = await trx
        .insertInto('schools')
        .values({
          trust_id: DEMO_TRUST.id,
          name: school.name,
          reference_number: school.referenceNumber,
          phase: school.phase,
          climate_region: school.climateRegion,
          address: school.address,
          heating_fuel: school.heatingFuel,
          fuel_price_gbp_per_kwh: school.fuelPriceGbpPerKwh,
          heating_efficiency: school.heatingEfficiency,
          timetable: school.timetable === null ? null : JSON.stringify(parseTimetableLines(school.timetable)),
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      const blockIds = new Map<string, string>();
      for (const block of school.blocks) {
        const { id } = await trx
          .insertInto('blocks')
          .values({
            school_id: schoolId,
            name: block.name,
            year_built: block.yearBuilt,
            construction_type: block.constructionType,
            air_permeability_m3h_m2: block.airPermeabilityM3hM2,
            heating_type: block.heatingType,
            heating_fuel: block.heatingFuel,
            heating_installed_year: block.heatingInstalledYear,
            fuel_price_gbp_per_kwh: block.fuelPriceGbpPerKwh ?? null,
            heating_efficiency: block.heatingEfficiency ?? null,
          })
          .returning('id')
          .executeTakeFirstOrThrow();
        blockIds.set(block.name, id);
      }
      const rooms = demoRooms(school, index).map((room) => ({
        school_id: schoolId,
        block_id: blockIds.get(room.blockName) ?? null,
        code: room.code,
        name: room.name,
        use: room.use,
        floor_area_m2: room.floorAreaM2,
        ceiling_height_m: room.ceilingHeightM,
        pupils: room.pupils,
        adults: room.adults,
        age_group: room.ageGroup,
        orientation_deg: room.orientationDeg,
        glazing_area_m2: room.glazingAreaM2,
        openable_area_m2: room.openableAreaM2,
        window_type: room.windowType,
        frame_material: room.frameMaterial,
        glazing_g_value: room.glazingGValue,
        ventilation_type: room.ventilationType,
        mechanical_supply_lps: room.mechanicalSupplyLps,
        notes: room.notes,
      }));
      await trx.insertInto('rooms').values(rooms).execute();
    }
    await trx
      .insertInto('audit_events')
      .values({
        trust_id: DEMO_TRUST.id,
        action: 'seed',
        entity_type: 'trust',
        entity_id: DEMO_TRUST.id,
        summary: 'Demo estate created',
      })
      .execute();
  });
  return true;
}
