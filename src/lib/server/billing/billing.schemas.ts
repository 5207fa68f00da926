import { z } from 'zod';
import { BILLING_INTERVALS } from './plans';

const interval = z.enum(BILLING_INTERVALS, { message: 'interval must be "month" or "year"' });

/** POST /api/billing/checkout: which billing period to start with (monthly when the body is empty). */
export const CheckoutBodySchema = z
  .object({ interval: interval.default('month') })
  .optional()
  .transform((body) => body ?? { interval: 'month' as const });

/** POST /api/billing/period: the billing period to switch to. */
export const PeriodBodySchema = z.object({ interval });

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
