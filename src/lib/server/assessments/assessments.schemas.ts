import { z } from 'zod';

/** Body of POST /api/assessments. */
export const StartRunSchema = z.discriminatedUnion(
  'scope',
  [
    z.object({ scope: z.literal('trust') }).strict(),
    z
      .object({
        scope: z.literal('school'),
        schoolId: z.uuid({ message: 'schoolId must be the id of one of your schools' }),
      })
      .strict(),
  ],
  { error: 'scope must be "trust" or "school" (with a schoolId)' },
);
export type StartRunBody = z.infer<typeof StartRunSchema>;

export const RunIdSchema = z.uuid({ message: 'That is not a valid assessment run id.' });

/** Body of PUT /api/assessments/retention. */
export const RetentionSchema = z
  .object({
    keepRuns: z
      .number({ error: 'keepRuns must be a whole number of runs from 1 to 100' })
      .int('keepRuns must be a whole number of runs from 1 to 100')
      .min(1, 'Keep the results of at least the latest run.')
      .max(100, 'Keep the results of at most 100 runs.'),
  })
  .strict();
export type RetentionBody = z.infer<typeof RetentionSchema>;

export const ListRunsQuerySchema = z.object({ limit: z.coerce.number().int().min(1).max(100).default(20) });

/** Body of POST /api/rooms/[id]/what-if: each change is optional; at least one is needed. */
export const WhatIfSchema = z
  .object({
    pupils: z.number().int().min(0).max(500).optional(),
    openableAreaM2: z.number().min(0).max(500).optional(),
    addUnits: z
      .array(z.object({ modelId: z.string().min(1).max(100), count: z.number().int().min(1).max(12) }).strict())
      .max(6)
      .optional(),
  })
  .strict()
  .refine((b) => b.pupils !== undefined || b.openableAreaM2 !== undefined || (b.addUnits?.length ?? 0) > 0, {
    message: 'Change at least one of pupils, openableAreaM2 or addUnits.',
  });
export type WhatIfBody = z.infer<typeof WhatIfSchema>;

/** Body of PATCH /api/assumptions: one or more values by path, saved as one new version. */
export const AssumptionEditSchema = z
  .object({
    changes: z
      .array(z.object({ path: z.string().min(1).max(200), value: z.unknown() }).strict())
      .min(1, 'Send at least one change.')
      .max(50),
    summary: z.string().trim().max(500).optional(),
  })
  .strict();
export type AssumptionEditBody = z.infer<typeof AssumptionEditSchema>;

/** One generic unit model of the catalogue, as the API accepts it. */
export const UnitModelSchema = z
  .object({
    id: z
      .string()
      .trim()
      .min(1)
      .max(60)
      .regex(/^[a-z0-9-]+$/, 'use lower-case letters, digits and hyphens'),
    name: z.string().trim().min(1).max(100),
    nominalFlowLps: z.number().gt(0).max(2000),
    heatRecoveryEfficiency: z.number().min(0).max(0.95),
    specificFanPowerWPerLps: z.number().gt(0).max(5),
    installedCostGbp: z.number().min(0).max(1_000_000),
    annualMaintenanceGbp: z.number().min(0).max(100_000),
    lifeYears: z.number().int().min(1).max(60),
    soundDbA: z.number().min(0).max(90),
  })
  .strict();

/** Body of PUT /api/unit-models: the whole catalogue, saved as one new assumption version. */
export const UnitCatalogueSchema = z
  .object({
    models: z.array(UnitModelSchema).min(1, 'Keep at least one unit model in the catalogue.').max(50),
    summary: z.string().trim().max(500).optional(),
  })
  .strict()
  .refine((b) => new Set(b.models.map((m) => m.id)).size === b.models.length, {
    message: 'Each unit model needs its own id.',
    path: ['models'],
  });
export type UnitCatalogueBody = z.infer<typeof UnitCatalogueSchema>;
