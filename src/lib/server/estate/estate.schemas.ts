import { z } from 'zod';
import { BLOCK_LIMITS, type FieldLimit, limitMessage, ROOM_LIMITS, SCHOOL_LIMITS } from '../../engine/limits';
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

/** Any heating efficiency (0.3–6); whether it fits the fuel is checked by checks.ts efficiencyProblem. */
const heatingEfficiency = z
  .number()
  .min(0.3, 'Heating efficiency must be between 0.3 (a poor boiler) and 6 (a heat pump’s seasonal COP).')
  .max(6, 'Heating efficiency must be between 0.3 (a poor boiler) and 6 (a heat pump’s seasonal COP).');

/** A school's own attributes, declared once for adding and editing. */
const schoolFields = {
  name: z.string().trim().min(1, 'School name is required').max(200, 'School name can be at most 200 characters'),
  // Blank is none: reference numbers are unique within a trust, so '' must never be stored.
  referenceNumber: z
    .string()
    .trim()
    .max(50, 'Reference number can be at most 50 characters')
    .nullable()
    .transform((v) => v || null),
  phase: oneOf(SCHOOL_PHASES, 'Phase'),
  climateRegion: oneOf(CLIMATE_REGIONS, 'Climate region'),
  address: z
    .string()
    .trim()
    .max(500, 'Address can be at most 500 characters')
    .nullable()
    .transform((v) => v || null),
  heatingFuel: oneOf(HEATING_FUELS, 'Heating fuel'),
  fuelPriceGbpPerKwh: limited(SCHOOL_LIMITS.fuelPriceGbpPerKwh).nullable(),
  /** Seasonal efficiency (seasonal COP for heat pumps, 1 for direct electric); checked against the fuel by the service. */
  heatingEfficiency: heatingEfficiency.nullable(),
  /** The school's own day as lines "09:00-10:00 lesson"; blank clears it (the assumption set's applies). */
  timetable: TimetableTextSchema,
};

/** POST /api/schools: a new school; heating gas unless said, price and efficiency the trust's unless given. */
export const SchoolCreateSchema = z.object({
  name: schoolFields.name,
  referenceNumber: schoolFields.referenceNumber.optional(),
  phase: schoolFields.phase,
  climateRegion: schoolFields.climateRegion,
  address: schoolFields.address.optional(),
  heatingFuel: schoolFields.heatingFuel.default('gas'),
  fuelPriceGbpPerKwh: schoolFields.fuelPriceGbpPerKwh.optional(),
  heatingEfficiency: schoolFields.heatingEfficiency.optional(),
  timetable: schoolFields.timetable.optional(),
});
export type SchoolCreate = z.infer<typeof SchoolCreateSchema>;

/** PATCH /api/schools/[id]: any of the school's attributes. */
export const SchoolPatchSchema = z.object(schoolFields).partial().strict();
export type SchoolPatch = z.infer<typeof SchoolPatchSchema>;

/** A block's own attributes, declared once for adding and editing. */
const blockFields = {
  name: z.string().trim().min(1, 'Block name is required').max(200, 'Block name can be at most 200 characters'),
  yearBuilt: limited(BLOCK_LIMITS.yearBuilt).nullable(),
  constructionType: oneOf(CONSTRUCTION_TYPES, 'Construction type').nullable(),
  airPermeabilityM3hM2: limited(BLOCK_LIMITS.airPermeabilityM3hM2).nullable(),
  heatingType: oneOf(HEATING_TYPES, 'Heating type').nullable(),
  heatingFuel: oneOf(HEATING_FUELS, 'Heating fuel').nullable(),
  fuelPriceGbpPerKwh: limited(BLOCK_LIMITS.fuelPriceGbpPerKwh).nullable(),
  heatingEfficiency: heatingEfficiency.nullable(),
  heatingInstalledYear: limited(BLOCK_LIMITS.heatingInstalledYear).nullable(),
};

/** POST /api/blocks: a new block of a school; attributes not given are unknown. */
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

/** PATCH /api/blocks/[id]: any of the block's attributes. */
export const BlockPatchSchema = z.object(blockFields).partial().strict();
export type BlockPatch = z.infer<typeof BlockPatchSchema>;
