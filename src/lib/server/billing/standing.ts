import { GRACE_PERIOD_DAYS, type PlanId } from './plans';

/** What the billing columns of a trust say, as stored from the provider's subscription. */
export interface BillingSnapshot {
  plan: PlanId;
  status: string;
  paymentFailedAt: Date | null;
}

/** Where a trust stands: which plan's limits apply and whether it may write. */
export interface BillingStanding {
  /** The plan whose limits apply now (a cancelled or never-paid subscription falls back to free). */
  effectivePlan: PlanId;
  /** ok: normal use; grace: a payment failed, full use until graceEndsAt; read_only: writes refused. */
  mode: 'ok' | 'grace' | 'read_only';
  graceEndsAt: Date | null;
}

const DAY_MS = 24 * 3600 * 1000;
const PAID_STATUSES = new Set(['active', 'trialing', 'past_due', 'unpaid']);

/**
 * Derives the standing from the stored snapshot and the time now. The provider marks a subscription
 * `past_due` while it retries a failed renewal and `unpaid` once retries are exhausted; we give
 * GRACE_PERIOD_DAYS from the first failure, then read-only until a payment succeeds. Data is never deleted.
 */
export function billingStanding(snapshot: BillingSnapshot, now: Date = new Date()): BillingStanding {
  if (snapshot.plan !== 'per_school' || !PAID_STATUSES.has(snapshot.status)) {
    return { effectivePlan: 'free', mode: 'ok', graceEndsAt: null };
  }
  if (snapshot.status === 'active' || snapshot.status === 'trialing') {
    return { effectivePlan: 'per_school', mode: 'ok', graceEndsAt: null };
  }
  const failedAt = snapshot.paymentFailedAt ?? now;
  const graceEndsAt = new Date(failedAt.getTime() + GRACE_PERIOD_DAYS * DAY_MS);
  const readOnly = snapshot.status === 'unpaid' || now.getTime() >= graceEndsAt.getTime();
  return { effectivePlan: 'per_school', mode: readOnly ? 'read_only' : 'grace', graceEndsAt };
}
