/**
 * Checks a RoomAssessmentInput field by field against the ranges of limits.ts; the first problem throws
 * EngineInputError naming the field. Unknown values (null) are allowed where the input types say so.
 */
import { EngineInputError, requireOneOf } from './errors';
import {
  BLOCK_LIMITS,
  heatingEfficiencyLimit,
  MAX_GLAZING_PER_FLOOR_AREA,
  MIN_FLOOR_AREA_PER_OCCUPANT_M2,
  requireWithin,
  ROOM_LIMITS,
  SCHOOL_LIMITS,
  type FieldLimit,
} from './limits';
import type { RoomAssessmentInput } from './types';
import {
  AGE_GROUPS,
  CLIMATE_REGIONS,
  CONSTRUCTION_TYPES,
  FRAME_MATERIALS,
  HEATING_FUELS,
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
} from './vocabulary';

function nullable(field: string, value: number | null, limit: FieldLimit): void {
  if (value === null || (value >= limit.min && value <= limit.max && (!limit.integer || Number.isInteger(value))))
    return;
  requireWithin(field, value, limit);
}

/** Each vocabulary as a set, so a check is one hash lookup however long the list. */
const KNOWN = new Map<readonly string[], ReadonlySet<string>>(
  [
    AGE_GROUPS,
    CLIMATE_REGIONS,
    CONSTRUCTION_TYPES,
    FRAME_MATERIALS,
    HEATING_FUELS,
    ROOM_USES,
    SCHOOL_PHASES,
    VENTILATION_TYPES,
    WINDOW_TYPES,
  ].map((list) => [list, new Set<string>(list)]),
);

function nullableOneOf<T extends string>(field: string, value: T | null, allowed: readonly T[]): void {
  if (value !== null && !(KNOWN.get(allowed) as ReadonlySet<string>).has(value)) requireOneOf(field, value, allowed);
}

/** Valid ranges of every input field (limits.ts), plus the cross-field rules: openable ≤ glazing ≤ 3 × floor, and
 *  no more than one occupant per MIN_FLOOR_AREA_PER_OCCUPANT_M2 of floor. */
export function validateRoomInput(input: RoomAssessmentInput): void {
  if (typeof input !== 'object' || input === null)
    throw new EngineInputError('input', 'must be an object with room, block and school');
  const { room, block, school } = input;
  if (typeof room !== 'object' || room === null) throw new EngineInputError('room', 'is missing');
  if (typeof block !== 'object' || block === null) throw new EngineInputError('block', 'is missing');
  if (typeof school !== 'object' || school === null) throw new EngineInputError('school', 'is missing');
  const L = ROOM_LIMITS;

  if (typeof room.code !== 'string') throw new EngineInputError('room.code', 'must be text');
  if (typeof room.name !== 'string') throw new EngineInputError('room.name', 'must be text');
  nullableOneOf('room.use', room.use, ROOM_USES);
  if (typeof room.floorAreaM2 !== 'number') requireWithin('room.floorAreaM2', room.floorAreaM2, L.floorAreaM2);
  nullable('room.floorAreaM2', room.floorAreaM2, L.floorAreaM2);
  nullable('room.ceilingHeightM', room.ceilingHeightM, L.ceilingHeightM);
  nullable('room.pupils', room.pupils, L.pupils);
  nullable('room.adults', room.adults, L.adults);
  const occupants = (room.pupils ?? 0) + (room.adults ?? 0);
  if (occupants * MIN_FLOOR_AREA_PER_OCCUPANT_M2 > room.floorAreaM2)
    throw new EngineInputError(
      room.pupils !== null && room.pupils > 0 ? 'room.pupils' : 'room.adults',
      `${occupants} people in ${room.floorAreaM2} m² is more than one per ${MIN_FLOOR_AREA_PER_OCCUPANT_M2} m²: no room can hold them`,
    );
  nullableOneOf('room.ageGroup', room.ageGroup, AGE_GROUPS);
  nullable('room.orientationDeg', room.orientationDeg, L.orientationDeg);
  nullable('room.glazingAreaM2', room.glazingAreaM2, L.glazingAreaM2);
  if (room.glazingAreaM2 !== null && room.glazingAreaM2 > MAX_GLAZING_PER_FLOOR_AREA * room.floorAreaM2)
    throw new EngineInputError('room.glazingAreaM2', `must be at most ${MAX_GLAZING_PER_FLOOR_AREA} × the floor area`);
  nullable('room.openableAreaM2', room.openableAreaM2, L.openableAreaM2);
  if (
    room.openableAreaM2 !== null &&
    room.openableAreaM2 > (room.glazingAreaM2 ?? MAX_GLAZING_PER_FLOOR_AREA * room.floorAreaM2)
  )
    throw new EngineInputError('room.openableAreaM2', 'must be at most the glazing area');
  nullableOneOf('room.windowType', room.windowType, WINDOW_TYPES);
  nullableOneOf('room.frameMaterial', room.frameMaterial, FRAME_MATERIALS);
  nullable('room.glazingGValue', room.glazingGValue, L.glazingGValue);
  nullableOneOf('room.ventilationType', room.ventilationType, VENTILATION_TYPES);
  nullable('room.mechanicalSupplyLps', room.mechanicalSupplyLps, L.mechanicalSupplyLps);
  nullable('room.winterWindowOpenFraction', room.winterWindowOpenFraction, L.winterWindowOpenFraction);

  nullable('block.yearBuilt', block.yearBuilt, BLOCK_LIMITS.yearBuilt);
  nullableOneOf('block.constructionType', block.constructionType, CONSTRUCTION_TYPES);
  nullable('block.airPermeabilityM3hM2', block.airPermeabilityM3hM2, BLOCK_LIMITS.airPermeabilityM3hM2);
  nullableOneOf('block.heatingFuel', block.heatingFuel, HEATING_FUELS);
  nullable('block.fuelPriceGbpPerKwh', block.fuelPriceGbpPerKwh, BLOCK_LIMITS.fuelPriceGbpPerKwh);
  nullable(
    'block.heatingEfficiency',
    block.heatingEfficiency,
    heatingEfficiencyLimit(block.heatingFuel ?? school.heatingFuel),
  );
  nullable('block.heatingInstalledYear', block.heatingInstalledYear, BLOCK_LIMITS.heatingInstalledYear);

  if (school.phase === null) requireOneOf('school.phase', school.phase, SCHOOL_PHASES);
  nullableOneOf('school.phase', school.phase, SCHOOL_PHASES);
  if (school.climateRegion === null) requireOneOf('school.climateRegion', school.climateRegion, CLIMATE_REGIONS);
  nullableOneOf('school.climateRegion', school.climateRegion, CLIMATE_REGIONS);
  if (school.heatingFuel === null) requireOneOf('school.heatingFuel', school.heatingFuel, HEATING_FUELS);
  nullableOneOf('school.heatingFuel', school.heatingFuel, HEATING_FUELS);
  nullable('school.fuelPriceGbpPerKwh', school.fuelPriceGbpPerKwh, SCHOOL_LIMITS.fuelPriceGbpPerKwh);
  nullable('school.heatingEfficiency', school.heatingEfficiency, heatingEfficiencyLimit(school.heatingFuel));
}
