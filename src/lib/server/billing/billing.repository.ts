import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../../../../db/database';
import type { BillingInterval, PlanId } from './plans';
import type { BillingSnapshot } from './standing';

type Db = Kysely<Database> | Transaction<Database>;

/** A trust's billing account as the app uses it. */
export interface BillingAccount extends BillingSnapshot {
  trustId: string;
  interval: BillingInterval | null;
  customerId: string | null;
  subscriptionId: string | null;
  quantity: number;
  currentPeriodEnd: Date | null;
  trialEnd: Date | null;
  cancelAtPeriodEnd: boolean;
  /** The checkout page last started, perhaps still open at the provider. */
  openCheckoutSessionId: string | null;
}

/** The account of a trust; a trust without a row is on the free plan with no provider customer. */
export async function getBillingAccount(db: Db, trustId: string): Promise<BillingAccount> {
  const row = await db.selectFrom('billing_accounts').selectAll().where('trust_id', '=', trustId).executeTakeFirst();
  if (!row) {
    return {
      trustId,
      plan: 'free',
      status: 'none',
      paymentFailedAt: null,
      interval: null,
      customerId: null,
      subscriptionId: null,
      quantity: 0,
      currentPeriodEnd: null,
      trialEnd: null,
      cancelAtPeriodEnd: false,
      openCheckoutSessionId: null,
    };
  }
  return {
    trustId: row.trust_id,
    plan: row.plan as PlanId,
    status: row.status,
    paymentFailedAt: row.payment_failed_at,
    interval: row.billing_interval as BillingInterval | null,
    customerId: row.provider_customer_id,
    subscriptionId: row.provider_subscription_id,
    quantity: row.quantity,
    currentPeriodEnd: row.current_period_end,
    trialEnd: row.trial_end,
    cancelAtPeriodEnd: row.cancel_at_period_end,
    openCheckoutSessionId: row.open_checkout_session_id,
  };
}

/** Counts the trust's schools and rooms (what the plan limits are about). */
export async function countEstate(db: Db, trustId: string): Promise<{ schools: number; rooms: number }> {
  const schools = await db
    .selectFrom('schools')
    .where('trust_id', '=', trustId)
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .executeTakeFirstOrThrow();
  const rooms = await db
    .selectFrom('rooms')
    .innerJoin('schools', 'schools.id', 'rooms.school_id')
    .where('schools.trust_id', '=', trustId)
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .executeTakeFirstOrThrow();
  return { schools: Number(schools.n), rooms: Number(rooms.n) };
}
