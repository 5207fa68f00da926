/** The register export: the estate's rooms with their school and block, as rows of the template. */
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { ActiveTrust } from '../auth/context';
import { listPlacedRooms } from '../estate/estate.repository';
import type { PlacedRoom } from '../estate/estate.types';
import type { RegisterRecord } from './workbook';
import { postcodeIn } from '../../engine/school-inference';

/** One room as a register row: every field in the template's units (winter window opening in %). */
export function toRegisterRecord({ school, block, room }: PlacedRoom): RegisterRecord {
  return {
    school: school.name,
    schoolPhase: school.phase,
    block: block?.name ?? null,
    yearBuilt: block?.yearBuilt ?? null,
    code: room.code,
    name: room.name,
    use: room.use,
    floorAreaM2: room.floorAreaM2,
    ceilingHeightM: room.ceilingHeightM,
    pupils: room.pupils,
    adults: room.adults,
    ageGroup: room.ageGroup,
    orientationDeg: room.orientationDeg,
    glazingAreaM2: room.glazingAreaM2,
    openableAreaM2: room.openableAreaM2,
    windowType: room.windowType,
    ventilationType: room.ventilationType,
    mechanicalSupplyLps: room.mechanicalSupplyLps,
    airPermeabilityM3hM2: block?.airPermeabilityM3hM2 ?? null,
    glazingGValue: room.glazingGValue,
    frameMaterial: room.frameMaterial,
    winterWindowOpenFraction: room.winterWindowOpenFraction === null ? null : 100 * room.winterWindowOpenFraction,
    schoolHeatingFuel: school.heatingFuel,
    schoolFuelPriceGbpPerKwh: school.fuelPriceGbpPerKwh,
    schoolHeatingEfficiency: school.heatingEfficiency,
    blockHeatingFuel: block?.heatingFuel ?? null,
    blockFuelPriceGbpPerKwh: block?.fuelPriceGbpPerKwh ?? null,
    blockHeatingEfficiency: block?.heatingEfficiency ?? null,
    notes: room.notes,
    schoolPostcode: postcodeIn(school.address),
  };
}

/** Every room of the trust (the member's schools) as register rows, by school, block and room code. */
export async function listRegisterRecords(db: Kysely<Database>, trust: ActiveTrust): Promise<RegisterRecord[]> {
  return (await listPlacedRooms(db, trust)).map(toRegisterRecord);
}
