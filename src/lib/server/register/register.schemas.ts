import { z } from 'zod';
import {
  AGE_GROUPS,
  CLIMATE_REGIONS,
  CONSTRUCTION_TYPES,
  HEATING_FUELS,
  HEATING_TYPES,
  ROOM_USES,
  SCHOOL_PHASES,
  VENTILATION_TYPES,
  WINDOW_TYPES,
} from '../../engine/vocabulary';
import { REGISTER_FIELDS } from './columns';

const oneOf = <T extends readonly [string, ...string[]]>(values: T, what: string) =>
  z.enum(values, { message: `${what} must be one of: ${values.join(', ')}` });

/** A room's own attributes, in our units, as the import and the editing API both validate them. */
export const RoomFieldsSchema = z.object({
  code: z.string().trim().min(1, 'Room code is required').max(40, 'Room code can be at most 40 characters'),
  name: z.string().trim().max(200, 'Room name can be at most 200 characters'),
  use: oneOf(ROOM_USES, 'Room use'),
  floorAreaM2: z
    .number({ message: 'Floor area is required' })
    .gt(0, 'Floor area must be more than 0 m²')
    .max(5000, 'Floor area must be at most 5,000 m²'),
  ceilingHeightM: z
    .number({ message: 'Ceiling height is required' })
    .min(2, 'Ceiling height must be at least 2 m')
    .max(12, 'Ceiling height must be at most 12 m'),
  pupils: z
    .number()
    .int('Pupils must be a whole number')
    .min(0, 'Pupils cannot be negative')
    .max(2000, 'Pupils must be at most 2,000'),
  adults: z
    .number()
    .int('Adults must be a whole number')
    .min(0, 'Adults cannot be negative')
    .max(200, 'Adults must be at most 200'),
  ageGroup: oneOf(AGE_GROUPS, 'Age group'),
  orientationDeg: z.number().int().min(0).max(359, 'Orientation must be a bearing from 0 to 359 degrees').nullable(),
  glazingAreaM2: z.number().min(0, 'Glazing area cannot be negative').max(5000),
  openableAreaM2: z.number().min(0, 'Openable area cannot be negative').max(5000),
  windowType: oneOf(WINDOW_TYPES, 'Window type').nullable(),
  ventilationType: oneOf(VENTILATION_TYPES, 'Ventilation type'),
  mechanicalSupplyLps: z
    .number()
    .min(0, 'Mechanical supply cannot be negative')
    .max(20000, 'Mechanical supply must be at most 20,000 l/s')
    .nullable(),
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
  if (room.openableAreaM2 > room.glazingAreaM2 + 1e-9) {
    problems.push({
      field: 'openableAreaM2',
      severity: 'error',
      message: `Openable area (${room.openableAreaM2} m²) is larger than the glazing area (${room.glazingAreaM2} m²); a window cannot open more than its glass.`,
    });
  }
  if (room.use === 'classroom' && room.ceilingHeightM >= 5) {
    problems.push({
      field: 'ceilingHeightM',
      severity: 'warning',
      message: `A ${room.ceilingHeightM} m ceiling is unusually high for a classroom; check it is not in millimetres or the height of the building.`,
    });
  }
  if (room.pupils > 0 && room.floorAreaM2 / room.pupils < 1) {
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
  use: RoomFieldsSchema.shape.use.default('classroom'),
  pupils: RoomFieldsSchema.shape.pupils.default(0),
  adults: RoomFieldsSchema.shape.adults.default(0),
  orientationDeg: RoomFieldsSchema.shape.orientationDeg.default(null),
  glazingAreaM2: RoomFieldsSchema.shape.glazingAreaM2.default(0),
  openableAreaM2: RoomFieldsSchema.shape.openableAreaM2.default(0),
  windowType: RoomFieldsSchema.shape.windowType.default(null),
  mechanicalSupplyLps: RoomFieldsSchema.shape.mechanicalSupplyLps.default(null),
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
    fuelPriceGbpPerKwh: z.number().gt(0).lt(5).nullable().optional(),
    boilerEfficiency: z.number().gt(0).max(1).nullable().optional(),
  })
  .strict();
export type SchoolPatch = z.infer<typeof SchoolPatchSchema>;

const blockFields = {
  name: z.string().trim().min(1, 'Block name is required').max(200),
  yearBuilt: z.number().int().min(1700).max(2100).nullable(),
  constructionType: oneOf(CONSTRUCTION_TYPES, 'Construction type').nullable(),
  airPermeabilityM3hM2: z.number().gt(0).max(100, 'Air permeability must be at most 100 m³/(h·m²) at 50 Pa').nullable(),
  heatingType: oneOf(HEATING_TYPES, 'Heating type').nullable(),
  heatingFuel: oneOf(HEATING_FUELS, 'Heating fuel').nullable(),
  heatingInstalledYear: z.number().int().min(1900).max(2100).nullable(),
};

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
    heatingInstalledYear: blockFields.heatingInstalledYear.default(null),
  })
  .strict();
export type BlockCreate = z.infer<typeof BlockCreateSchema>;

/** PATCH /api/blocks/[id]. */
export const BlockPatchSchema = z.object(blockFields).partial().strict();
export type BlockPatch = z.infer<typeof BlockPatchSchema>;

/** POST /api/imports/[id]/commit. */
export const CommitBodySchema = z
  .object({
    rows: z.enum(['valid', 'none'], {
      message: 'rows must be "valid" (commit the rows without errors) or "none" (cancel)',
    }),
    deleteMissing: z.boolean().default(false),
  })
  .strict();
export type CommitBody = z.infer<typeof CommitBodySchema>;

/** The optional form fields of POST /api/imports besides `file`. */
export const ImportOptionsSchema = z.object({
  headerRow: z.coerce.number().int().min(1).max(30).optional(),
  mapping: z
    .string()
    .optional()
    .transform((text, ctx) => {
      if (!text) return undefined;
      try {
        const parsed = z
          .record(z.string().regex(/^[A-Z]{1,3}$/), z.enum(REGISTER_FIELDS).nullable())
          .parse(JSON.parse(text));
        return parsed;
      } catch {
        ctx.addIssue({ code: 'custom', message: 'mapping must be JSON like {"H": "floorAreaM2", "K": null}' });
        return z.NEVER;
      }
    }),
});
export type ImportOptions = {
  headerRow?: number | undefined;
  mapping?: Record<string, (typeof REGISTER_FIELDS)[number] | null> | undefined;
};
