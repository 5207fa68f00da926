/**
 * Unknown register values become the assumption set's defaults here, each one listed so the result can say
 * "assumed". Nothing unknown is ever read as 0.
 */
import type {
  AgeGroup,
  AssumedValue,
  AssumptionSet,
  RoomInput,
  RoomUse,
  SchoolPhase,
  VentilationType,
  WindowType,
} from './types';

/** A room with every value known (given or assumed). */
export interface ResolvedRoom {
  use: RoomUse;
  ceilingHeightM: number;
  pupils: number;
  adults: number;
  ageGroup: AgeGroup;
  glazingAreaM2: number;
  openableAreaM2: number;
  windowType: WindowType;
  glazingGValue: number;
  ventilationType: VentilationType;
}

/** The age group a school's phase implies (all-through and special schools: secondary). */
export function ageGroupForPhase(phase: SchoolPhase): AgeGroup {
  switch (phase) {
    case 'nursery':
      return 'early_years';
    case 'primary':
      return 'primary';
    case 'further_education':
      return 'sixth_form';
    default:
      return 'secondary';
  }
}

function note(assumed: AssumedValue[], field: string, value: string | number, reason: string): void {
  assumed.push({ field, value, reason });
}

/** Fills the room's unknown values from `assumptions.defaults.room`; pushes each onto `assumed`. */
export function resolveRoom(
  room: RoomInput,
  phase: SchoolPhase,
  set: AssumptionSet,
  assumed: AssumedValue[],
): ResolvedRoom {
  const d = set.defaults.room.value;
  const use = room.use ?? d.use;
  if (room.use === null) note(assumed, 'room.use', use, 'not recorded: assumed a classroom');
  const teaching = set.occupancy.teachingUses.value.includes(use);
  const ceilingHeightM = room.ceilingHeightM ?? d.ceilingHeightM;
  if (room.ceilingHeightM === null)
    note(assumed, 'room.ceilingHeightM', ceilingHeightM, 'not recorded: typical classroom ceiling');
  let pupils = room.pupils;
  if (pupils === null) {
    pupils = teaching ? Math.max(1, Math.floor(room.floorAreaM2 / d.floorAreaPerPupilM2)) : 0;
    note(
      assumed,
      'room.pupils',
      pupils,
      teaching
        ? 'not recorded: the default floor area a pupil'
        : 'not recorded: no pupils in a room that is not for teaching',
    );
  }
  let adults = room.adults;
  if (adults === null) {
    adults = teaching ? d.adultsInTeachingRoom : 0;
    note(assumed, 'room.adults', adults, teaching ? 'not recorded: one teacher' : 'not recorded: none');
  }
  const ageGroup = room.ageGroup ?? ageGroupForPhase(phase);
  if (room.ageGroup === null) note(assumed, 'room.ageGroup', ageGroup, 'not recorded: from the school phase');
  const glazingAreaM2 = room.glazingAreaM2 ?? room.floorAreaM2 * d.glazingShareOfFloor;
  if (room.glazingAreaM2 === null)
    note(assumed, 'room.glazingAreaM2', glazingAreaM2, 'not recorded: the default share of the floor');
  const openableAreaM2 = room.openableAreaM2 ?? glazingAreaM2 * d.openableShareOfGlazing;
  if (room.openableAreaM2 === null)
    note(assumed, 'room.openableAreaM2', openableAreaM2, 'not recorded: the default share of the glazing opens');
  const windowType = room.windowType ?? d.windowType;
  if (room.windowType === null)
    note(assumed, 'room.windowType', windowType, 'not recorded: the commonest classroom window');
  const glazingGValue = room.glazingGValue ?? d.glazingGValue;
  if (room.glazingGValue === null)
    note(assumed, 'room.glazingGValue', glazingGValue, 'not recorded: typical double glazing');
  const ventilationType = room.ventilationType ?? d.ventilationType;
  if (room.ventilationType === null)
    note(assumed, 'room.ventilationType', ventilationType, 'not recorded: windows on one side');
  return {
    use,
    ceilingHeightM,
    pupils,
    adults,
    ageGroup,
    glazingAreaM2,
    openableAreaM2,
    windowType,
    glazingGValue,
    ventilationType,
  };
}
