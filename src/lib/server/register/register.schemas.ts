import { z } from 'zod';
import { CLIMATE_REGIONS, SCHOOL_PHASES } from '../../engine/vocabulary';
import { REGISTER_FIELDS } from './columns';
import { nameKey, type SchoolChoices } from './plan';

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

/** The preview's choices for new schools: school name → phase and climate region (either may be left out). */
const SchoolChoicesSchema = z
  .record(
    z.string().max(200),
    z
      .object({
        phase: z.enum(SCHOOL_PHASES, { message: `phase must be one of: ${SCHOOL_PHASES.join(', ')}` }).optional(),
        climateRegion: z
          .enum(CLIMATE_REGIONS, { message: `climateRegion must be one of: ${CLIMATE_REGIONS.join(', ')}` })
          .optional(),
      })
      .strict(),
  )
  .refine((r) => Object.keys(r).length <= 500, 'schools can name at most 500 schools')
  .transform((r) => Object.fromEntries(Object.entries(r).map(([name, choice]) => [nameKey(name), choice])));

/** The optional form fields of POST /api/imports besides `file`. */
export const ImportOptionsSchema = z.object({
  headerRow: z.coerce.number().int().min(1).max(30).optional(),
  /** "true": a blank cell clears the stored value; otherwise blanks keep what is stored. */
  clearBlanks: z
    .enum(['true', 'false'], { message: 'clearBlanks must be true or false' })
    .optional()
    .transform((v) => v === 'true'),
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
  /** JSON: the phase and region chosen in the preview for schools the file creates, by their name as the file has it. */
  schools: z
    .string()
    .max(100_000, 'schools is too long')
    .optional()
    .transform((text, ctx) => {
      if (!text) return undefined;
      const parsed = SchoolChoicesSchema.safeParse(
        (() => {
          try {
            return JSON.parse(text);
          } catch {
            return null;
          }
        })(),
      );
      if (parsed.success) return parsed.data;
      ctx.addIssue({
        code: 'custom',
        message: `schools must be JSON like {"Oakfield Primary": {"phase": "primary", "climateRegion": "midlands"}}: ${parsed.error.issues[0]?.message ?? 'not valid'}`,
      });
      return z.NEVER;
    }),
});
export type ImportOptions = {
  schools?: SchoolChoices | undefined;
  headerRow?: number | undefined;
  clearBlanks?: boolean | undefined;
  mapping?: Record<string, (typeof REGISTER_FIELDS)[number] | null> | undefined;
};
