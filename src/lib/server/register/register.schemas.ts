import { z } from 'zod';
import { REGISTER_FIELDS } from './columns';

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
});
export type ImportOptions = {
  headerRow?: number | undefined;
  clearBlanks?: boolean | undefined;
  mapping?: Record<string, (typeof REGISTER_FIELDS)[number] | null> | undefined;
};
