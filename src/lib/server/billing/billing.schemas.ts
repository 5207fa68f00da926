import { z } from 'zod';
import { BILLING_INTERVALS } from './plans';

const interval = z.enum(BILLING_INTERVALS, { message: 'interval must be "month" or "year"' });

/** POST /api/billing/checkout: which billing period to start with (monthly when the body is empty). */
export const CheckoutBodySchema = z
  .object({ interval: interval.default('month') })
  .optional()
  .transform((body) => body ?? { interval: 'month' as const });

/** A proration moment (Unix seconds) from a preview, sent back on confirming so the charge matches what was shown. */
const prorationDate = z.coerce
  .number({ message: 'prorationDate must be the moment the price was worked out (Unix seconds).' })
  .int('prorationDate must be a whole number of seconds.')
  .positive('prorationDate must be the moment the price was worked out (Unix seconds).');

/** POST /api/billing/period: the billing period to switch to, and the proration moment of the preview confirmed. */
export const PeriodBodySchema = z.object({ interval, prorationDate: prorationDate.optional() });

/** GET /api/billing/period-preview: the billing period to price a switch to. */
export const PeriodPreviewQuerySchema = z.object({ interval });

/** GET /api/billing/quantity-preview: the school count after a change (before = the trust's schools now). */
export const QuantityPreviewQuerySchema = z.object({
  schoolsAfter: z.coerce
    .number({ message: 'schoolsAfter must be the number of schools the trust would have.' })
    .int('schoolsAfter must be a whole number of schools.')
    .min(0, 'schoolsAfter cannot be negative.')
    .max(10_000, 'schoolsAfter cannot be more than 10,000 schools.'),
});

/** POST /api/billing/invoice-payment: ask to pay by invoice against a purchase order. */
export const InvoicePaymentBodySchema = z.object({
  purchaseOrder: z
    .string({ message: 'Give the purchase-order number your finance office issued.' })
    .trim()
    .min(1, 'Give the purchase-order number your finance office issued.')
    .max(60, 'A purchase-order number is at most 60 characters.')
    .regex(/^[A-Za-z0-9][A-Za-z0-9 ./_-]*$/, 'A purchase-order number uses letters, digits, spaces and . / _ - only.'),
  billingEmail: z
    .string({ message: 'Give the e-mail address invoices should go to.' })
    .trim()
    .toLowerCase()
    .email('Give the e-mail address invoices should go to, e.g. accounts@your-trust.sch.uk.')
    .max(254, 'That e-mail address is too long.'),
  note: z.string().trim().max(500, 'Keep the note under 500 characters.').optional(),
});
export type InvoicePaymentInput = z.infer<typeof InvoicePaymentBodySchema>;

/** POST /api/billing/cancel: an explicit confirmation, so a stray POST cannot end a subscription. */
export const CancelBodySchema = z.object({
  atPeriodEnd: z.literal(true, { message: 'Send { "atPeriodEnd": true } to cancel at the end of the paid period.' }),
});

/** A person-readable invoice, as the billing API and page show it. */
export interface InvoiceSummary {
  id: string;
  number: string | null;
  status: string;
  amountDuePence: number;
  amountPaidPence: number;
  /** The invoice total split by VAT (prices are VAT-inclusive, UK standard rate; see vat.ts). */
  netPence: number;
  vatPence: number;
  grossPence: number;
  vatRatePct: number;
  currency: string;
  createdAt: string;
  url: string | null;
}

/** The billing overview for the billing page and GET /api/billing. */
export interface BillingOverview {
  plan: 'free' | 'per_school';
  planName: string;
  status: string;
  interval: 'month' | 'year' | null;
  quantity: number;
  schoolCount: number;
  roomCount: number;
  limits: { maxSchools: number | null; maxRooms: number | null };
  currentPeriodEnd: string | null;
  trialEnd: string | null;
  cancelAtPeriodEnd: boolean;
  mode: 'ok' | 'grace' | 'read_only';
  graceEndsAt: string | null;
  pricePerSchoolPence: { month: number; year: number };
}
