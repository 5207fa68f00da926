/** The estate's sense checks beyond each field's range: the same on import, in the editors and in the browser. */
import {
  heatingEfficiencyLimit,
  MAX_GLAZING_PER_FLOOR_AREA,
  MIN_FLOOR_AREA_PER_OCCUPANT_M2,
} from '../../engine/limits';
import type { RoomFieldName, RoomFields } from './estate.schemas';

/** A problem with one value: which field, how bad, and what to do about it. */
export interface FieldProblem {
  field: RoomFieldName;
  severity: 'error' | 'warning';
  message: string;
}

/** The physical sense checks beyond each field's range (the same on import and in the editor). */
export function physicalChecks(room: RoomFields): FieldProblem[] {
  const problems: FieldProblem[] = [];
  const occupants = (room.pupils ?? 0) + (room.adults ?? 0);
  if (occupants * MIN_FLOOR_AREA_PER_OCCUPANT_M2 > room.floorAreaM2) {
    problems.push({
      field: room.pupils ? 'pupils' : 'adults',
      severity: 'error',
      message: `${occupants} people in ${room.floorAreaM2} m² is more than one per ${MIN_FLOOR_AREA_PER_OCCUPANT_M2} m²: no room can hold them. Check the floor area and the numbers.`,
    });
  }
  if (room.glazingAreaM2 !== null && room.glazingAreaM2 > MAX_GLAZING_PER_FLOOR_AREA * room.floorAreaM2 + 1e-9) {
    problems.push({
      field: 'glazingAreaM2',
      severity: 'error',
      message: `Glazing area (${room.glazingAreaM2} m²) is more than ${MAX_GLAZING_PER_FLOOR_AREA} times the floor area; check the units.`,
    });
  }
  if (room.openableAreaM2 !== null && room.glazingAreaM2 !== null && room.openableAreaM2 > room.glazingAreaM2 + 1e-9) {
    problems.push({
      field: 'openableAreaM2',
      severity: 'error',
      message: `Openable area (${room.openableAreaM2} m²) is larger than the glazing area (${room.glazingAreaM2} m²); a window cannot open more than its glass.`,
    });
  }
  if (room.use === 'classroom' && room.ceilingHeightM !== null && room.ceilingHeightM >= 5) {
    problems.push({
      field: 'ceilingHeightM',
      severity: 'warning',
      message: `A ${room.ceilingHeightM} m ceiling is unusually high for a classroom; check it is not in millimetres or the height of the building.`,
    });
  }
  if (room.pupils !== null && room.pupils > 0 && room.floorAreaM2 / room.pupils < 1) {
    problems.push({
      field: 'pupils',
      severity: 'warning',
      message: `${room.pupils} pupils in ${room.floorAreaM2} m² is less than 1 m² each; check the floor area and the pupil number.`,
    });
  }
  return problems;
}

/** The heating efficiency a fuel allows (limits.ts): a message, or null when it fits. */
export function efficiencyProblem(fuel: string, efficiency: number | null | undefined): string | null {
  if (efficiency === null || efficiency === undefined) return null;
  const limit = heatingEfficiencyLimit(fuel);
  return efficiency >= limit.min && efficiency <= limit.max
    ? null
    : `${limit.label} for ${fuel.replace('_', ' ')} heating must be ${limit.min === limit.max ? `exactly ${limit.min}` : `between ${limit.min} and ${limit.max}`}.`;
}
