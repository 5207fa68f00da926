import { sql, type Kysely, type Transaction } from 'kysely';
import type Stripe from 'stripe';
import type { Database } from '../../../../db/database';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import { getBillingAccount, type BillingAccount } from './billing.repository';
import { planName, type BillingInterval, type PlanId } from './plans';

type Db = Kysely<Database> | Transaction<Database>;
type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** Subscription statuses in which the trust is (still) on the paid plan. */
export const LIVE = new Set(['trialing', 'active', 'past_due', 'unpaid']);

/** What we store about a subscription, read from the provider's object (never from event order). */
export interface SubscriptionState {
  trustId: string | null;
  customerId: string;
  subscriptionId: string;
  plan: PlanId;
  status: string;
  interval: BillingInterval | null;
  quantity: number;
  currentPeriodEnd: Date | null;
  trialEnd: Date | null;
  cancelAtPeriodEnd: boolean;
  paymentFailedAt: Date | null;
}

const fromUnix = (seconds: number | null | undefined) => (seconds ? new Date(seconds * 1000) : null);

/**
 * Fetches the subscription as the provider has it now, and when a renewal is unpaid, the date of
 * the oldest open invoice (when payment first failed; the grace period counts from it).
 */
export async function readSubscription(stripe: Stripe, subscriptionId: string): Promise<SubscriptionState> {
  const sub = await stripe.subscriptions.retrieve(subscriptionId);
  const item = sub.items.data[0];
  let paymentFailedAt: Date | null = null;
  if (sub.status === 'past_due' || sub.status === 'unpaid') {
    const open = await stripe.invoices.list({ subscription: sub.id, status: 'open', limit: 100 });
    const oldest = Math.min(...open.data.map((i) => i.created));
    paymentFailedAt = Number.isFinite(oldest) ? fromUnix(oldest) : new Date();
  }
  const interval: string | undefined = item?.price.recurring?.interval;
  return {
    trustId: sub.metadata['trust_id'] ?? null,
    customerId: typeof sub.customer === 'string' ? sub.customer : sub.customer.id,
    subscriptionId: sub.id,
    plan: LIVE.has(sub.status) ? 'per_school' : 'free',
    status: sub.status,
    interval: interval === 'month' || interval === 'year' ? (interval as BillingInterval) : null,
    quantity: item?.quantity ?? 0,
    currentPeriodEnd: fromUnix(item?.current_period_end),
    trialEnd: sub.status === 'trialing' ? fromUnix(sub.trial_end) : null,
    cancelAtPeriodEnd: sub.cancel_at_period_end,
    paymentFailedAt,
  };
}

/** The trust a provider customer belongs to, from our records. */
export async function trustForCustomer(db: Db, customerId: string): Promise<string | null> {
  const row = await db
    .selectFrom('billing_accounts')
    .select('trust_id')
    .where('provider_customer_id', '=', customerId)
    .executeTakeFirst();
  return row?.trust_id ?? null;
}

/** A short, readable description of a plan state for the audit trail. */
export function describePlan(
  a: Pick<BillingAccount, 'plan' | 'status' | 'interval' | 'quantity' | 'cancelAtPeriodEnd'>,
): string {
  if (a.plan === 'free') return `${planName('free')} (free)${a.status !== 'none' ? `, subscription ${a.status}` : ''}`;
  const period = a.interval === 'year' ? 'yearly' : 'monthly';
  return `${planName('per_school')} ${period}, ${a.quantity} school${a.quantity === 1 ? '' : 's'}, ${a.status}${a.cancelAtPeriodEnd ? ', cancels at period end' : ''}`;
}

/**
 * Stores a subscription's state on its trust's billing account (locking the row), and audits the
 * change when plan, status, period, quantity or cancellation differ. An older or ended subscription
 * never replaces a live one. Returns the account after the write, or null for an unknown trust.
 */
export async function applySubscriptionState(
  db: Db,
  state: SubscriptionState,
  actor: Actor,
  reason: string,
): Promise<BillingAccount | null> {
  const trustId = state.trustId ?? (await trustForCustomer(db, state.customerId));
  if (!trustId) return null;
  const trust = await db.selectFrom('trusts').select('id').where('id', '=', trustId).executeTakeFirst();
  if (!trust) return null;
  await db
    .insertInto('billing_accounts')
    .values({ trust_id: trustId })
    .onConflict((oc) => oc.column('trust_id').doNothing())
    .execute();
  await sql`SELECT 1 FROM billing_accounts WHERE trust_id = ${trustId} FOR UPDATE`.execute(db);
  const before = await getBillingAccount(db, trustId);
  const replacesLive =
    before.subscriptionId && before.subscriptionId !== state.subscriptionId && LIVE.has(before.status);
  if (replacesLive && !LIVE.has(state.status)) return before;
  await db
    .updateTable('billing_accounts')
    .set({
      plan: state.plan,
      status: state.status,
      billing_interval: state.interval,
      provider_customer_id: state.customerId,
      provider_subscription_id: state.subscriptionId,
      quantity: state.quantity,
      current_period_end: state.currentPeriodEnd,
      trial_end: state.trialEnd,
      cancel_at_period_end: state.cancelAtPeriodEnd,
      payment_failed_at: state.paymentFailedAt,
    })
    .where('trust_id', '=', trustId)
    .execute();
  const after = await getBillingAccount(db, trustId);
  const summaryBefore = describePlan(before);
  const summaryAfter = describePlan(after);
  if (summaryBefore !== summaryAfter) {
    await recordAudit(db, {
      trustId,
      ...actor,
      action: 'billing.plan_changed',
      entityType: 'subscription',
      entityId: state.subscriptionId,
      summary: `Plan changed from ${summaryBefore} to ${summaryAfter} (${reason})`,
      before: planSnapshot(before),
      after: planSnapshot(after),
    });
  }
  return after;
}

function planSnapshot(a: BillingAccount) {
  return {
    plan: a.plan,
    status: a.status,
    interval: a.interval,
    quantity: a.quantity,
    cancelAtPeriodEnd: a.cancelAtPeriodEnd,
    paymentFailedAt: a.paymentFailedAt,
  };
}

/**
 * Runs `fn` in a transaction holding the trust's billing row lock. Every change to a trust's billing
 * state (admin actions, webhooks) goes through it and reads the provider inside the lock, so the
 * last writer always stored the freshest provider state, and an admin's own change is audited as theirs.
 */
export async function withBillingLock<T>(
  db: Kysely<Database>,
  trustId: string,
  fn: (trx: Transaction<Database>) => Promise<T>,
): Promise<T> {
  return db.transaction().execute(async (trx) => {
    await trx
      .insertInto('billing_accounts')
      .values({ trust_id: trustId })
      .onConflict((oc) => oc.column('trust_id').doNothing())
      .execute();
    await sql`SELECT 1 FROM billing_accounts WHERE trust_id = ${trustId} FOR UPDATE`.execute(trx);
    return fn(trx);
  });
}

/**
 * Optionally changes the subscription at the provider (`change`), then reads it back and stores it,
 * all under the trust's billing lock.
 */
export async function syncSubscription(
  db: Kysely<Database>,
  stripe: Stripe,
  trustId: string,
  subscriptionId: string,
  actor: Actor,
  reason: string,
  change?: () => Promise<unknown>,
): Promise<BillingAccount | null> {
  return withBillingLock(db, trustId, async (trx) => {
    if (change) await change();
    const state = await readSubscription(stripe, subscriptionId);
    return applySubscriptionState(trx, { ...state, trustId }, actor, reason);
  });
}
