/** Checks a RoomAssessmentInput field by field; the first problem throws EngineInputError naming the field. */
import { EngineInputError, requireOneOf, requireRange } from './errors';
import type { RoomAssessmentInput } from './types';
import {
  AGE_GROUPS,
  CLIMATE_REGIONS,
  CONSTRUCTION_TYPES,
  HEATING_FUELS,
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
} from './vocabulary';

function nullableRange(field: string, value: number | null, min: number, max: number, unit: string): void {
  if (value !== null) requireRange(field, value, min, max, unit);
}

/** Valid ranges of every input field (documented on RoomInput, BlockInput and SchoolInput). */
export function validateRoomInput(input: RoomAssessmentInput): void {
  if (typeof input !== 'object' || input === null)
    throw new EngineInputError('input', 'must be an object with room, block and school');
  const { room, block, school } = input;
  if (typeof room !== 'object' || room === null) throw new EngineInputError('room', 'is missing');
  if (typeof block !== 'object' || block === null) throw new EngineInputError('block', 'is missing');
  if (typeof school !== 'object' || school === null) throw new EngineInputError('school', 'is missing');

  if (typeof room.code !== 'string') throw new EngineInputError('room.code', 'must be text');
  if (typeof room.name !== 'string') throw new EngineInputError('room.name', 'must be text');
  requireOneOf('room.use', room.use, ROOM_USES);
  requireRange('room.floorAreaM2', room.floorAreaM2, 1, 2000, 'm²');
  requireRange('room.ceilingHeightM', room.ceilingHeightM, 2, 15, 'm');
  requireRange('room.pupils', room.pupils, 0, 500, 'pupils');
  requireRange('room.adults', room.adults, 0, 50, 'adults');
  requireOneOf('room.ageGroup', room.ageGroup, AGE_GROUPS);
  if (room.orientationDeg !== null) {
    requireRange('room.orientationDeg', room.orientationDeg, 0, 360, '°');
  }
  requireRange('room.glazingAreaM2', room.glazingAreaM2, 0, room.floorAreaM2 * 3, 'm²');
  requireRange('room.openableAreaM2', room.openableAreaM2, 0, room.floorAreaM2, 'm²');
  requireOneOf('room.windowType', room.windowType, WINDOW_TYPES);
  nullableRange('room.glazingGValue', room.glazingGValue, 0.05, 0.9, '');
  requireOneOf('room.ventilationType', room.ventilationType, VENTILATION_TYPES);
  nullableRange('room.mechanicalSupplyLps', room.mechanicalSupplyLps, 0, 5000, 'l/s');

  nullableRange('block.yearBuilt', block.yearBuilt, 1800, 2100, '');
  if (block.constructionType !== null)
    requireOneOf('block.constructionType', block.constructionType, CONSTRUCTION_TYPES);
  nullableRange('block.airPermeabilityM3hM2', block.airPermeabilityM3hM2, 0.5, 50, 'm³/(h·m²)');
  if (block.heatingFuel !== null) requireOneOf('block.heatingFuel', block.heatingFuel, HEATING_FUELS);
  nullableRange('block.heatingInstalledYear', block.heatingInstalledYear, 1900, 2100, '');

  requireOneOf('school.phase', school.phase, SCHOOL_PHASES);
  requireOneOf('school.climateRegion', school.climateRegion, CLIMATE_REGIONS);
  requireOneOf('school.heatingFuel', school.heatingFuel, HEATING_FUELS);
  nullableRange('school.fuelPriceGbpPerKwh', school.fuelPriceGbpPerKwh, 0, 2, '£/kWh');
  nullableRange('school.boilerEfficiency', school.boilerEfficiency, 0.3, 6, '');
}
