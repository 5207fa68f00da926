/**
 * Airtally's plans. Prices are ours to set and are invented for the product; the provider only
 * learns them through the catalogue the app creates (see catalogue.ts), found again by lookup key.
 */

/** Our plan ids, as stored in billing_accounts.plan. */
export const PLAN_IDS = ['free', 'per_school'] as const;
/** One of PLAN_IDS. */
export type PlanId = (typeof PLAN_IDS)[number];

/** How often the per-school plan is billed (the provider's recurring intervals we sell). */
export const BILLING_INTERVALS = ['month', 'year'] as const;
/** One of BILLING_INTERVALS. */
export type BillingInterval = (typeof BILLING_INTERVALS)[number];

/** The free plan: one school, a capped room register, no payment details. */
export const FREE_PLAN = {
  id: 'free',
  name: 'Single School',
  maxSchools: 1,
  maxRooms: 60,
} as const;

/** The paid plan: every school of the trust, priced per school, 30-day trial on the first subscription. */
export const PER_SCHOOL_PLAN = {
  id: 'per_school',
  name: 'Whole Estate',
  trialDays: 30,
  /** Price per school, in pence, for each billing interval. */
  unitAmountPence: { month: 2_400, year: 24_000 } satisfies Record<BillingInterval, number>,
  /** Lookup keys of the provider prices, so the same code finds them in any account. */
  lookupKeys: { month: 'airtally_whole_estate_monthly', year: 'airtally_whole_estate_yearly' } satisfies Record<
    BillingInterval,
    string
  >,
} as const;

/** Days a trust keeps full use after a renewal payment fails, before the register goes read-only. */
export const GRACE_PERIOD_DAYS = 14;

/** Display name of a plan. */
export function planName(plan: PlanId): string {
  return plan === 'free' ? FREE_PLAN.name : PER_SCHOOL_PLAN.name;
}
