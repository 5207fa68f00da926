import type { Kysely } from 'kysely';
import type Stripe from 'stripe';
import type { Database } from '../../../../db/database';
import type { AuditEntry } from '../audit/audit.repository';
import { recordAudit } from '../audit/audit.repository';
import { conflict } from '../http/errors';
import { countEstate, getBillingAccount, type BillingAccount } from './billing.repository';
import type { BillingOverview, InvoiceSummary } from './billing.schemas';
import { planPrices } from './catalogue';
import { paymentProvider, providerConfigured } from './provider';
import { FREE_PLAN, PER_SCHOOL_PLAN, planName, type BillingInterval } from './plans';
import { billableSchools, CHANGEABLE } from './price-change';
import { billingStanding } from './standing';
import { splitVatInclusive } from './vat';

export { billableSchools };
import { syncSubscription, withBillingLock } from './subscription-sync';

type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** The trust, the person acting, and where the app is reached (for checkout return links). */
export interface BillingRequest {
  trust: { id: string; name: string };
  actor: Actor & { actorEmail: string };
  origin: string;
}

/** Plan, standing and counts for the billing page (no provider calls). */
export async function billingOverview(db: Kysely<Database>, trustId: string): Promise<BillingOverview> {
  const account = await getBillingAccount(db, trustId);
  const standing = billingStanding(account);
  const counts = await countEstate(db, trustId);
  const free = standing.effectivePlan === 'free';
  return {
    plan: standing.effectivePlan,
    planName: planName(standing.effectivePlan),
    status: account.status,
    interval: account.interval,
    quantity: account.quantity,
    schoolCount: counts.schools,
    roomCount: counts.rooms,
    limits: { maxSchools: free ? FREE_PLAN.maxSchools : null, maxRooms: free ? FREE_PLAN.maxRooms : null },
    currentPeriodEnd: account.currentPeriodEnd?.toISOString() ?? null,
    trialEnd: account.trialEnd?.toISOString() ?? null,
    cancelAtPeriodEnd: account.cancelAtPeriodEnd,
    mode: standing.mode,
    graceEndsAt: standing.graceEndsAt?.toISOString() ?? null,
    pricePerSchoolPence: PER_SCHOOL_PLAN.unitAmountPence,
  };
}

async function ensureCustomer(
  db: Kysely<Database>,
  stripe: Stripe,
  req: BillingRequest,
  account: BillingAccount,
): Promise<string> {
  if (account.customerId) return account.customerId;
  const customer = await stripe.customers.create(
    { name: req.trust.name, email: req.actor.actorEmail, metadata: { trust_id: req.trust.id } },
    { idempotencyKey: `airtally-customer-${req.trust.id}` },
  );
  await db
    .insertInto('billing_accounts')
    .values({ trust_id: req.trust.id, provider_customer_id: customer.id })
    .onConflict((oc) => oc.column('trust_id').doUpdateSet({ provider_customer_id: customer.id }))
    .execute();
  return customer.id;
}

/**
 * Starts the upgrade to the per-school plan: a hosted checkout session for one seat per school,
 * with the 30-day trial when the trust has never subscribed. Returns the page to send the admin to.
 * Under the trust's billing lock, the checkout page started before (another tab, another admin) is
 * closed at the provider first, so only the newest page can be paid and a trust cannot end up
 * with two subscriptions.
 */
export async function startCheckout(
  db: Kysely<Database>,
  stripe: Stripe,
  req: BillingRequest,
  interval: BillingInterval,
): Promise<{ url: string }> {
  return withBillingLock(db, req.trust.id, async (trx) => {
    const account = await getBillingAccount(trx, req.trust.id);
    if (billingStanding(account).effectivePlan === 'per_school') {
      throw conflict(
        `This trust is already on the ${PER_SCHOOL_PLAN.name} plan. Change its billing period or cancellation here instead.`,
      );
    }
    const customerId = await ensureCustomer(trx, stripe, req, account);
    const prices = await planPrices(stripe);
    const { schools } = await countEstate(trx, req.trust.id);
    if (account.openCheckoutSessionId) await expireIfOpen(stripe, account.openCheckoutSessionId);
    const firstSubscription = account.subscriptionId === null;
    const session = await stripe.checkout.sessions.create({
      mode: 'subscription',
      customer: customerId,
      client_reference_id: req.trust.id,
      line_items: [{ price: prices[interval], quantity: billableSchools(schools) }],
      subscription_data: {
        metadata: { trust_id: req.trust.id },
        ...(firstSubscription ? { trial_period_days: PER_SCHOOL_PLAN.trialDays } : {}),
      },
      metadata: { trust_id: req.trust.id },
      success_url: `${req.origin}/app/settings/billing?checkout=success`,
      cancel_url: `${req.origin}/app/settings/billing?checkout=cancelled`,
    });
    if (!session.url) throw new Error('The payment provider returned a checkout session without a URL');
    await trx
      .updateTable('billing_accounts')
      .set({ open_checkout_session_id: session.id })
      .where('trust_id', '=', req.trust.id)
      .execute();
    await recordAudit(trx, {
      trustId: req.trust.id,
      ...req.actor,
      action: 'billing.checkout_started',
      entityType: 'subscription',
      entityId: null,
      summary: `Upgrade to ${PER_SCHOOL_PLAN.name} (${interval === 'year' ? 'yearly' : 'monthly'}, ${billableSchools(schools)} schools) started at checkout`,
    });
    return { url: session.url };
  });
}

/** Closes a checkout page at the provider unless it is already paid or closed. */
async function expireIfOpen(stripe: Stripe, sessionId: string): Promise<void> {
  const session = await stripe.checkout.sessions.retrieve(sessionId).catch((error: unknown) => {
    if ((error as { code?: string }).code === 'resource_missing') return null;
    throw error;
  });
  if (session?.status === 'open') await stripe.checkout.sessions.expire(sessionId);
}

async function liveSubscription(
  db: Kysely<Database>,
  trustId: string,
): Promise<{ account: BillingAccount; subscriptionId: string }> {
  const account = await getBillingAccount(db, trustId);
  if (!account.subscriptionId || !CHANGEABLE.has(account.status)) {
    throw conflict(`This trust has no ${PER_SCHOOL_PLAN.name} subscription to change. Upgrade first.`);
  }
  return { account, subscriptionId: account.subscriptionId };
}

/** Switches between monthly and yearly billing (the provider prorates and restarts the cycle). */
export async function changeInterval(
  db: Kysely<Database>,
  stripe: Stripe,
  req: BillingRequest,
  interval: BillingInterval,
  prorationDate?: number,
): Promise<BillingOverview> {
  const { subscriptionId } = await liveSubscription(db, req.trust.id);
  if (prorationDate !== undefined) assertFreshProration(prorationDate);
  const sub = await stripe.subscriptions.retrieve(subscriptionId);
  const item = sub.items.data[0];
  if (!item) throw conflict('The subscription has no plan item to change.');
  const prices = await planPrices(stripe);
  const change =
    item.price.recurring?.interval === interval
      ? undefined
      : () =>
          stripe.subscriptions.update(subscriptionId, {
            items: [{ id: item.id, price: prices[interval] }],
            proration_behavior: 'create_prorations',
            ...(prorationDate !== undefined ? { proration_date: prorationDate } : {}),
          });
  await syncSubscription(
    db,
    stripe,
    req.trust.id,
    subscriptionId,
    req.actor,
    `billing period set to ${interval === 'year' ? 'yearly' : 'monthly'} by a trust admin`,
    change,
  );
  return billingOverview(db, req.trust.id);
}

/** How long a confirmed price stays good: older than this, the change is priced again before it is made. */
const PRORATION_FRESH_S = 30 * 60;

/** 409 when the price confirmed was worked out too long ago (or in the future), so nobody pays a figure they did not see. */
function assertFreshProration(prorationDate: number): void {
  const ageS = Date.now() / 1000 - prorationDate;
  if (ageS > PRORATION_FRESH_S || ageS < -60) {
    throw conflict(
      'The price you confirmed was worked out more than 30 minutes ago, so it may have changed. Open the change again, check the new figure and confirm it.',
    );
  }
}

/** Cancels at the end of the paid period (true) or takes that back (false). Data is never deleted. */
export async function setCancelAtPeriodEnd(
  db: Kysely<Database>,
  stripe: Stripe,
  req: BillingRequest,
  cancel: boolean,
): Promise<BillingOverview> {
  const { subscriptionId } = await liveSubscription(db, req.trust.id);
  await syncSubscription(
    db,
    stripe,
    req.trust.id,
    subscriptionId,
    req.actor,
    cancel ? 'cancelled at period end by a trust admin' : 'resumed by a trust admin',
    () => stripe.subscriptions.update(subscriptionId, { cancel_at_period_end: cancel }),
  );
  return billingOverview(db, req.trust.id);
}

/**
 * Makes the subscription quantity follow the school count, prorated for the rest of the period.
 * Does nothing on the free plan or when the quantity is already right.
 */
export async function syncQuantity(db: Kysely<Database>, stripe: Stripe, trustId: string, actor: Actor): Promise<void> {
  const account = await getBillingAccount(db, trustId);
  if (!account.subscriptionId || !CHANGEABLE.has(account.status)) return;
  const wanted = billableSchools((await countEstate(db, trustId)).schools);
  if (account.quantity === wanted) return;
  const subscriptionId = account.subscriptionId;
  const sub = await stripe.subscriptions.retrieve(subscriptionId);
  const item = sub.items.data[0];
  if (!item) return;
  const change =
    item.quantity === wanted
      ? undefined
      : () =>
          stripe.subscriptions.update(subscriptionId, {
            items: [{ id: item.id, quantity: wanted }],
            proration_behavior: 'create_prorations',
          });
  await syncSubscription(db, stripe, trustId, subscriptionId, actor, `school count is now ${wanted}`, change);
}

/**
 * Call after a write that added or removed schools (school form, register import): brings the
 * subscription quantity in line. Never throws: the school change stands; if the provider was unreachable, the
 * billing page says the quantity is behind and a trust admin updates it there (POST /api/billing/quantity).
 */
export async function followSchoolCount(db: Kysely<Database>, trustId: string, actor: Actor): Promise<void> {
  if (!providerConfigured()) return;
  try {
    await syncQuantity(db, paymentProvider(), trustId, actor);
  } catch (error) {
    console.error('Subscription quantity not updated; a trust admin can update it from the billing page', error);
  }
}

/** An invoice total split into net and VAT (our prices include VAT at the UK standard rate). */
function vatOf(totalPence: number) {
  const split = splitVatInclusive(totalPence);
  return {
    netPence: split.netPence,
    vatPence: split.vatPence,
    grossPence: split.grossPence,
    vatRatePct: split.ratePct,
  };
}

/** The trust's invoices, newest first. */
export async function listInvoices(db: Kysely<Database>, stripe: Stripe, trustId: string): Promise<InvoiceSummary[]> {
  const account = await getBillingAccount(db, trustId);
  if (!account.customerId) return [];
  const invoices = await stripe.invoices.list({ customer: account.customerId, limit: 24 });
  return invoices.data.map((i) => ({
    id: i.id ?? '',
    number: i.number,
    status: i.status ?? 'draft',
    amountDuePence: i.amount_due,
    amountPaidPence: i.amount_paid,
    ...vatOf(i.total),
    currency: i.currency,
    createdAt: new Date(i.created * 1000).toISOString(),
    url: i.hosted_invoice_url ?? null,
  }));
}

/** The next invoice's amount and date, or null when nothing is due (free plan, or cancelling). */
export async function upcomingInvoice(
  db: Kysely<Database>,
  stripe: Stripe,
  trustId: string,
): Promise<{ amountDuePence: number; date: string } | null> {
  const account = await getBillingAccount(db, trustId);
  if (!account.subscriptionId || !CHANGEABLE.has(account.status) || account.cancelAtPeriodEnd) return null;
  try {
    const preview = await stripe.invoices.createPreview({ subscription: account.subscriptionId });
    const at = preview.next_payment_attempt ?? preview.period_end;
    return { amountDuePence: preview.amount_due, date: new Date(at * 1000).toISOString() };
  } catch (error) {
    if ((error as { code?: string }).code === 'invoice_upcoming_none') return null;
    throw error;
  }
}
