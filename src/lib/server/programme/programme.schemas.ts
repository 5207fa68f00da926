/** Request shapes of the capital programme API (zod); the engine's ProgrammeSettings is what they parse to. */
import { z } from 'zod';
import { OBJECTIVES, WINDOW_IDS, YEAR_CONVENTIONS } from '../../engine/programme/types';

const fraction = (name: string, max: number) =>
  z
    .number({ message: `${name} must be a number (a fraction: 0.12 means 12 %)` })
    .min(0, `${name} cannot be negative`)
    .max(max, `${name} can be at most ${max * 100} %`);

const money = (name: string, max: number) =>
  z
    .number({ message: `${name} must be an amount in pounds` })
    .min(0, `${name} cannot be negative`)
    .max(max, `${name} can be at most £${max.toLocaleString('en-GB')}`);

const id = (name: string) => z.uuid({ message: `${name} must be an id` });

/** On-costs as fractions of the installed price. */
export const OnCostRatesSchema = z.object({
  preliminariesRate: fraction('Preliminaries', 1),
  feesRate: fraction('Fees', 1),
  contingencyRate: fraction('Contingency', 1),
  inflationRatePerYear: fraction('Inflation a year', 0.5),
  vatRate: fraction('VAT', 0.5),
  vatRecoverable: z.boolean({ message: 'Say whether the trust recovers VAT (true or false)' }),
});

export const ProgrammeSettingsSchema = z
  .object({
    yearConvention: z.enum(YEAR_CONVENTIONS, {
      message: 'Years run September–August (sep_aug) or April–March (apr_mar)',
    }),
    firstYear: z
      .number({ message: 'The first year must be a calendar year' })
      .int('The first year must be a whole year')
      .min(2020, 'The first year must be 2020 or later')
      .max(2100, 'The first year must be 2100 or earlier'),
    budgetsGbp: z
      .array(money('Each year’s capital', 1e9), { message: 'Give the capital for each year' })
      .min(1, 'Give the capital for at least one year')
      .max(10, 'A programme covers at most 10 years'),
    onCosts: OnCostRatesSchema,
    windows: z
      .array(
        z.object({
          id: z.enum(WINDOW_IDS, { message: `Windows are ${WINDOW_IDS.join(', ')}` }),
          workingDays: z
            .number({ message: 'Working days must be a number' })
            .int('Working days must be a whole number')
            .min(0, 'Working days cannot be negative')
            .max(60, 'A window can have at most 60 working days'),
        }),
      )
      .length(WINDOW_IDS.length, `Give all ${WINDOW_IDS.length} windows: ${WINDOW_IDS.join(', ')}`)
      .refine((list) => new Set(list.map((w) => w.id)).size === list.length, 'Give each window once'),
    unitsPerWorkingDay: z
      .number({ message: 'Units a day must be a number' })
      .min(0.1, 'The contractor must fit at least 0.1 units a working day')
      .max(1000, 'At most 1,000 units a working day'),
    mobilisationGbp: money('Mobilisation per school visit', 1e6),
    forcedIn: z.array(id('A forced-in room')).max(20000).default([]),
    keptOut: z.array(id('A kept-out room')).max(20000).default([]),
    heatingJoins: z
      .array(z.object({ blockId: id('blockId'), year: z.number().int().min(1, 'Years start at 1').max(10) }))
      .max(5000)
      .default([]),
    pins: z
      .array(
        z.object({
          roomId: id('roomId'),
          year: z.number().int().min(1, 'Years start at 1').max(10, 'A programme has at most 10 years'),
          windowId: z.enum(WINDOW_IDS).nullable().default(null),
        }),
      )
      .max(20000)
      .default([]),
    objective: z.enum(OBJECTIVES, { message: 'Optimise pupil_hours or rank_weights' }).default('pupil_hours'),
    energyPriceChangePct: z
      .number({ message: 'Energy price change must be a percentage' })
      .min(-90, 'Energy prices can fall by at most 90 %')
      .max(500, 'Energy prices can rise by at most 500 %')
      .default(0),
  })
  .superRefine((s, ctx) => {
    const kept = new Set(s.keptOut);
    if (s.forcedIn.some((r) => kept.has(r)))
      ctx.addIssue({ code: 'custom', path: ['forcedIn'], message: 'A room cannot be both forced in and kept out.' });
    for (const pin of s.pins)
      if (pin.year > s.budgetsGbp.length)
        ctx.addIssue({
          code: 'custom',
          path: ['pins'],
          message: `A room is pinned to year ${pin.year}, but the programme has ${s.budgetsGbp.length} years.`,
        });
    if (new Set(s.pins.map((p) => p.roomId)).size !== s.pins.length)
      ctx.addIssue({ code: 'custom', path: ['pins'], message: 'Pin each room once.' });
  });
export type ProgrammeSettingsInput = z.infer<typeof ProgrammeSettingsSchema>;

const name = z
  .string({ message: 'Give the programme a name' })
  .trim()
  .min(1, 'Give the programme a name')
  .max(120, 'A programme name can be at most 120 characters');

/** POST /api/programmes: a new programme from the latest results (or the snapshot of `basedOn`). */
export const CreateProgrammeSchema = z.object({
  name,
  settings: ProgrammeSettingsSchema,
  /** Plan from the same candidate snapshot as this programme (a scenario of it). */
  basedOn: id('basedOn').optional(),
});
export type CreateProgrammeInput = z.infer<typeof CreateProgrammeSchema>;

/** PUT /api/programmes/[id]: new name and/or settings; the plan is made again from its snapshot. */
export const UpdateProgrammeSchema = z
  .object({ name: name.optional(), settings: ProgrammeSettingsSchema.optional() })
  .refine((b) => b.name !== undefined || b.settings !== undefined, 'Give a new name or new settings.');
export type UpdateProgrammeInput = z.infer<typeof UpdateProgrammeSchema>;

/** POST /api/programmes/[id]/edits: one change by hand. */
export const ProgrammeEditSchema = z.discriminatedUnion(
  'action',
  [
    z.object({
      action: z.literal('pin'),
      roomId: id('roomId'),
      year: z.number({ message: 'year must be a programme year' }).int().min(1, 'Years start at 1').max(10),
      windowId: z.enum(WINDOW_IDS).nullable().default(null),
    }),
    z.object({ action: z.literal('unpin'), roomId: id('roomId') }),
    z.object({ action: z.literal('force_in'), roomId: id('roomId') }),
    z.object({ action: z.literal('keep_out'), roomId: id('roomId') }),
    z.object({ action: z.literal('release'), roomId: id('roomId') }),
  ],
  { message: 'action must be pin, unpin, force_in, keep_out or release' },
);
export type ProgrammeEdit = z.infer<typeof ProgrammeEditSchema>;

/** GET /api/programmes/compare?ids=a,b,c */
export const CompareQuerySchema = z.object({
  ids: z
    .string({ message: 'Give ids: two or three programme ids separated by commas' })
    .transform((v) =>
      v
        .split(',')
        .map((s) => s.trim())
        .filter(Boolean),
    )
    .pipe(z.array(id('Each id')).min(2, 'Compare at least two programmes').max(3, 'Compare at most three programmes')),
});

/** GET /api/programmes/[id]/bid-pack.pdf?schoolId= */
export const BidPackQuerySchema = z.object({ schoolId: id('schoolId') });
