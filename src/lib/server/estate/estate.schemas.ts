import { z } from 'zod';
import {
  BLOCK_LIMITS,
  type FieldLimit,
  heatingEfficiencyLimit,
  limitMessage,
  MAX_GLAZING_PER_FLOOR_AREA,
  MIN_FLOOR_AREA_PER_OCCUPANT_M2,
  ROOM_LIMITS,
  SCHOOL_LIMITS,
} from '../../engine/limits';
import {
  AGE_GROUPS,
  CLIMATE_REGIONS,
  CONSTRUCTION_TYPES,
  FRAME_MATERIALS,
  HEATING_FUELS,
  HEATING_TYPES,
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
} from '../../engine/vocabulary';
import { TimetableTextSchema } from './timetable';

/** Sortable columns of the rooms list, as the API names them. */
export const ROOM_SORT_KEYS = [
  'code',
  'name',
  'school',
  'block',
  'use',
  'floorAreaM2',
  'pupils',
  'ventilationType',
  'openableAreaM2',
] as const;

/** GET /api/rooms query string. */
export const RoomListQuerySchema = z.object({
  page: z.coerce.number().int().min(1, 'page starts at 1').default(1),
  pageSize: z.coerce.number().int().min(1).max(200, 'pageSize can be at most 200').default(50),
  sort: z.enum(ROOM_SORT_KEYS, { message: `sort must be one of: ${ROOM_SORT_KEYS.join(', ')}` }).default('code'),
  dir: z.enum(['asc', 'desc'], { message: 'dir must be asc or desc' }).default('asc'),
  schoolId: z.uuid({ message: 'schoolId must be a school id' }).optional(),
  blockId: z.uuid({ message: 'blockId must be a block id' }).optional(),
  use: z.enum(ROOM_USES, { message: `use must be one of: ${ROOM_USES.join(', ')}` }).optional(),
  ventilationType: z
    .enum(VENTILATION_TYPES, { message: `ventilationType must be one of: ${VENTILATION_TYPES.join(', ')}` })
    .optional(),
  q: z.string().trim().max(100).optional(),
});
export type RoomListQuery = z.infer<typeof RoomListQuerySchema>;

/** A path parameter that must be one of our ids. */
export const IdParamSchema = z.uuid({ message: 'That is not a valid id.' });

const oneOf = <T extends readonly [string, ...string[]]>(values: T, what: string) =>
  z.enum(values, { message: `${what} must be one of: ${values.join(', ')}` });

/** A number within one of the limits of src/lib/engine/limits.ts, with its plain message. */
export const limited = (limit: FieldLimit) => {
  const message = limitMessage(limit);
  const n = z.number({ message }).min(limit.min, message).max(limit.max, message);
  return limit.integer ? n.int(message) : n;
};

/**
 * A room's own attributes, in our units, as the import and the editing API both validate them. Ranges come from
 * ROOM_LIMITS; null is an unknown value (the engine assumes one and says so), never 0.
 */
export const RoomFieldsSchema = z.object({
  code: z.string().trim().min(1, 'Room code is required').max(40, 'Room code can be at most 40 characters'),
  name: z.string().trim().max(200, 'Room name can be at most 200 characters'),
  use: oneOf(ROOM_USES, 'Room use').nullable(),
  floorAreaM2: limited(ROOM_LIMITS.floorAreaM2),
  ceilingHeightM: limited(ROOM_LIMITS.ceilingHeightM).nullable(),
  pupils: limited(ROOM_LIMITS.pupils).nullable(),
  adults: limited(ROOM_LIMITS.adults).nullable(),
  ageGroup: oneOf(AGE_GROUPS, 'Age group').nullable(),
  orientationDeg: limited(ROOM_LIMITS.orientationDeg).nullable(),
  glazingAreaM2: limited(ROOM_LIMITS.glazingAreaM2).nullable(),
  openableAreaM2: limited(ROOM_LIMITS.openableAreaM2).nullable(),
  windowType: oneOf(WINDOW_TYPES, 'Window type').nullable(),
  frameMaterial: oneOf(FRAME_MATERIALS, 'Window frame').nullable(),
  glazingGValue: limited(ROOM_LIMITS.glazingGValue).nullable(),
  ventilationType: oneOf(VENTILATION_TYPES, 'Ventilation type').nullable(),
  mechanicalSupplyLps: limited(ROOM_LIMITS.mechanicalSupplyLps).nullable(),
  winterWindowOpenFraction: limited(ROOM_LIMITS.winterWindowOpenFraction).nullable(),
  notes: z.string().max(2000, 'Notes can be at most 2,000 characters').nullable(),
});
export type RoomFields = z.infer<typeof RoomFieldsSchema>;
export type RoomFieldName = keyof RoomFields;

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

/** POST /api/rooms: a new room in a school (and optionally a block of that school). */
export const RoomCreateSchema = RoomFieldsSchema.extend({
  schoolId: z.uuid({ message: 'schoolId must be a school id' }),
  blockId: z.uuid({ message: 'blockId must be a block id' }).nullable().default(null),
  name: RoomFieldsSchema.shape.name.default(''),
  use: RoomFieldsSchema.shape.use.default(null),
  ceilingHeightM: RoomFieldsSchema.shape.ceilingHeightM.default(null),
  pupils: RoomFieldsSchema.shape.pupils.default(null),
  adults: RoomFieldsSchema.shape.adults.default(null),
  ageGroup: RoomFieldsSchema.shape.ageGroup.default(null),
  orientationDeg: RoomFieldsSchema.shape.orientationDeg.default(null),
  glazingAreaM2: RoomFieldsSchema.shape.glazingAreaM2.default(null),
  openableAreaM2: RoomFieldsSchema.shape.openableAreaM2.default(null),
  windowType: RoomFieldsSchema.shape.windowType.default(null),
  frameMaterial: RoomFieldsSchema.shape.frameMaterial.default(null),
  glazingGValue: RoomFieldsSchema.shape.glazingGValue.default(null),
  ventilationType: RoomFieldsSchema.shape.ventilationType.default(null),
  mechanicalSupplyLps: RoomFieldsSchema.shape.mechanicalSupplyLps.default(null),
  winterWindowOpenFraction: RoomFieldsSchema.shape.winterWindowOpenFraction.default(null),
  notes: RoomFieldsSchema.shape.notes.default(null),
}).strict();
export type RoomCreate = z.infer<typeof RoomCreateSchema>;

/** PATCH /api/rooms/[id]: any subset of the room's attributes, plus its block. */
export const RoomPatchSchema = RoomFieldsSchema.partial()
  .extend({
    blockId: z.uuid({ message: 'blockId must be a block id' }).nullable().optional(),
    /** The updatedAt the editor last saw; a newer row means someone else changed it (409). */
    ifUnmodifiedSince: z
      .string()
      .max(64)
      .refine(
        (v) => !Number.isNaN(Date.parse(v)),
        'ifUnmodifiedSince must be a date and time, such as 2026-12-01T09:30:00.000Z.',
      )
      .optional(),
  })
  .strict();
export type RoomPatch = z.infer<typeof RoomPatchSchema>;

/** POST /api/rooms/bulk: the same change to many rooms, or their deletion. */
export const RoomBulkSchema = z.discriminatedUnion('action', [
  z.object({
    action: z.literal('update'),
    ids: z.array(z.uuid()).min(1).max(5000),
    changes: RoomFieldsSchema.omit({ code: true })
      .partial()
      .extend({ blockId: z.uuid().nullable().optional() })
      .strict(),
  }),
  z.object({ action: z.literal('delete'), ids: z.array(z.uuid()).min(1).max(5000) }),
]);
export type RoomBulk = z.infer<typeof RoomBulkSchema>;

/** PATCH /api/schools/[id]. */
export const SchoolPatchSchema = z
  .object({
    name: z.string().trim().min(1, 'School name is required').max(200).optional(),
    referenceNumber: z.string().trim().max(40).nullable().optional(),
    phase: oneOf(SCHOOL_PHASES, 'Phase').optional(),
    climateRegion: oneOf(CLIMATE_REGIONS, 'Climate region').optional(),
    address: z.string().trim().max(500).nullable().optional(),
    heatingFuel: oneOf(HEATING_FUELS, 'Heating fuel').optional(),
    fuelPriceGbpPerKwh: limited(SCHOOL_LIMITS.fuelPriceGbpPerKwh).nullable().optional(),
    /** Seasonal efficiency (seasonal COP for heat pumps, 1 for direct electric); checked against the fuel by the service. */
    heatingEfficiency: z.number().min(0.3).max(6).nullable().optional(),
    /** The school's own day as lines "09:00-10:00 lesson"; blank clears it (the assumption set's applies). */
    timetable: TimetableTextSchema.optional(),
  })
  .strict();
export type SchoolPatch = z.infer<typeof SchoolPatchSchema>;

const blockFields = {
  name: z.string().trim().min(1, 'Block name is required').max(200),
  yearBuilt: z.number().int().min(1700).max(2100).nullable(),
  constructionType: oneOf(CONSTRUCTION_TYPES, 'Construction type').nullable(),
  airPermeabilityM3hM2: limited(BLOCK_LIMITS.airPermeabilityM3hM2).nullable(),
  heatingType: oneOf(HEATING_TYPES, 'Heating type').nullable(),
  heatingFuel: oneOf(HEATING_FUELS, 'Heating fuel').nullable(),
  fuelPriceGbpPerKwh: limited(BLOCK_LIMITS.fuelPriceGbpPerKwh).nullable(),
  heatingEfficiency: z.number().min(0.3).max(6).nullable(),
  heatingInstalledYear: limited(BLOCK_LIMITS.heatingInstalledYear).nullable(),
};

/** The heating efficiency a fuel allows (limits.ts): a message, or null when it fits. */
export function efficiencyProblem(fuel: string, efficiency: number | null | undefined): string | null {
  if (efficiency === null || efficiency === undefined) return null;
  const limit = heatingEfficiencyLimit(fuel);
  return efficiency >= limit.min && efficiency <= limit.max
    ? null
    : `${limit.label} for ${fuel.replace('_', ' ')} heating must be ${limit.min === limit.max ? `exactly ${limit.min}` : `between ${limit.min} and ${limit.max}`}.`;
}

/** POST /api/blocks. */
export const BlockCreateSchema = z
  .object({
    schoolId: z.uuid({ message: 'schoolId must be a school id' }),
    name: blockFields.name,
    yearBuilt: blockFields.yearBuilt.default(null),
    constructionType: blockFields.constructionType.default(null),
    airPermeabilityM3hM2: blockFields.airPermeabilityM3hM2.default(null),
    heatingType: blockFields.heatingType.default(null),
    heatingFuel: blockFields.heatingFuel.default(null),
    fuelPriceGbpPerKwh: blockFields.fuelPriceGbpPerKwh.default(null),
    heatingEfficiency: blockFields.heatingEfficiency.default(null),
    heatingInstalledYear: blockFields.heatingInstalledYear.default(null),
  })
  .strict();
export type BlockCreate = z.infer<typeof BlockCreateSchema>;

/** PATCH /api/blocks/[id]. */
export const BlockPatchSchema = z.object(blockFields).partial().strict();
export type BlockPatch = z.infer<typeof BlockPatchSchema>;

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
