import { z } from 'zod';
import { VENTILATION_TYPES } from '../../engine/vocabulary';

/** Sortable columns of the priorities list, as the API names them. */
export const PRIORITY_SORT_KEYS = [
  'rank',
  'school',
  'pupils',
  'meanCo2Ppm',
  'peakCo2Ppm',
  'riskBand',
  'unitCount',
  'capitalCostGbp',
  'simplePaybackYears',
  'npvGbp',
] as const;
export type PrioritySortKey = (typeof PRIORITY_SORT_KEYS)[number];

const weight = (name: string) =>
  z.coerce
    .number({ message: `${name} must be a number from 0 to 1` })
    .min(0, `${name} must be at least 0`)
    .max(1, `${name} must be at most 1`);

/** Ranking weights: each 0–1, at least one above 0 (they are used in proportion to their sum). */
export const WeightsSchema = z
  .object({ risk: weight('risk'), costEffectiveness: weight('costEffectiveness'), payback: weight('payback') })
  .refine((w) => w.risk + w.costEffectiveness + w.payback > 0, {
    message: 'At least one weight must be above 0.',
    path: ['risk'],
  });
export type Weights = z.infer<typeof WeightsSchema>;

const booleanParam = z
  .enum(['true', 'false'], { message: 'criteriaMet must be true or false' })
  .transform((v) => v === 'true');

/** Filters shared by the priorities list, its export and the dashboard. */
export const PriorityFilterSchema = z.object({
  schoolId: z.uuid({ message: 'schoolId must be a school id' }).optional(),
  blockId: z.uuid({ message: 'blockId must be a block id' }).optional(),
  band: z.coerce.number().int().min(1, 'band must be 1, 2, 3 or 4').max(4, 'band must be 1, 2, 3 or 4').optional(),
  ventilationType: z
    .enum(VENTILATION_TYPES, { message: `ventilationType must be one of: ${VENTILATION_TYPES.join(', ')}` })
    .optional(),
  criteriaMet: booleanParam.optional(),
});
export type PriorityFilter = z.infer<typeof PriorityFilterSchema>;

/**
 * GET /api/priorities query string. Weights (wRisk, wCost, wPayback) preview another ranking without
 * saving it; give all three or none (none = the trust's saved weights).
 */
export const PrioritiesQuerySchema = PriorityFilterSchema.extend({
  page: z.coerce.number().int().min(1, 'page starts at 1').default(1),
  pageSize: z.coerce
    .number()
    .int()
    .min(1, 'pageSize must be at least 1')
    .max(200, 'pageSize can be at most 200')
    .default(50),
  sort: z
    .enum(PRIORITY_SORT_KEYS, { message: `sort must be one of: ${PRIORITY_SORT_KEYS.join(', ')}` })
    .default('rank'),
  dir: z.enum(['asc', 'desc'], { message: 'dir must be asc or desc' }).default('asc'),
  wRisk: weight('wRisk').optional(),
  wCost: weight('wCost').optional(),
  wPayback: weight('wPayback').optional(),
}).transform(({ wRisk, wCost, wPayback, ...rest }, ctx) => {
  const given = [wRisk, wCost, wPayback].filter((w) => w !== undefined).length;
  if (given !== 0 && given !== 3) {
    ctx.addIssue({
      code: 'custom',
      path: ['wRisk'],
      message: 'Give all three weights (wRisk, wCost, wPayback) or none.',
    });
    return z.NEVER;
  }
  if (given === 3 && wRisk! + wCost! + wPayback! <= 0) {
    ctx.addIssue({ code: 'custom', path: ['wRisk'], message: 'At least one weight must be above 0.' });
    return z.NEVER;
  }
  const weights: Weights | null = given === 3 ? { risk: wRisk!, costEffectiveness: wCost!, payback: wPayback! } : null;
  return { ...rest, weights };
});
export type PrioritiesQuery = z.infer<typeof PrioritiesQuerySchema>;

/** GET /api/finance query string. */
export const FinanceQuerySchema = z.object({
  schoolId: z.uuid({ message: 'schoolId must be a school id' }).optional(),
});
export type FinanceQuery = z.infer<typeof FinanceQuerySchema>;
