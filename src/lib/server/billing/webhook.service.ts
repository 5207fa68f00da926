import type { Kysely, Transaction } from 'kysely';
import type Stripe from 'stripe';
import type { Database } from '../../../../db/database';
import { badRequest } from '../http/errors';
import { webhookSecret } from './provider';
import { recordAudit } from '../audit/audit.repository';
import { getBillingAccount } from './billing.repository';
import {
  applySubscriptionState,
  LIVE,
  readSubscription,
  trustForCustomer,
  withBillingLock,
  type SubscriptionState,
} from './subscription-sync';
import { notifyPaymentFailed } from './notify';

/**
 * Where an event's object points: its subscription and customer. Never the trust its metadata names:
 * the trust is the one whose customer (or subscription) we stored ourselves (resolveTrust).
 */
interface EventSubject {
  subscriptionId: string | null;
  customerId: string | null;
}

const idOf = (value: unknown): string | null => {
  if (typeof value === 'string') return value;
  if (value && typeof value === 'object' && 'id' in value && typeof value.id === 'string') return value.id;
  return null;
};

/** Finds the subscription an event is about, whatever kind of object it carries. */
export function subjectOf(event: Stripe.Event): EventSubject {
  const object = event.data.object as unknown as Record<string, unknown> & { object?: string };
  switch (object.object) {
    case 'subscription':
      return { subscriptionId: idOf(object['id']), customerId: idOf(object['customer']) };
    case 'invoice': {
      const invoice = object as unknown as Stripe.Invoice;
      return {
        subscriptionId: idOf(invoice.parent?.subscription_details?.subscription),
        customerId: idOf(invoice.customer),
      };
    }
    case 'checkout.session': {
      const session = object as unknown as Stripe.Checkout.Session;
      return { subscriptionId: idOf(session.subscription), customerId: idOf(session.customer) };
    }
    default:
      return { subscriptionId: null, customerId: idOf(object['customer']) };
  }
}

/** The subscription as the provider has it, or null when the provider no longer knows it (nothing to update). */
async function readSubscriptionIfExists(stripe: Stripe, subscriptionId: string): Promise<SubscriptionState | null> {
  try {
    return await readSubscription(stripe, subscriptionId);
  } catch (error) {
    if ((error as { code?: string }).code === 'resource_missing') return null;
    throw error;
  }
}

/** How far ahead of this server's clock a signed event's timestamp may be (clocks drift a little). */
const CLOCK_SKEW_SECONDS = 10;

/**
 * Verifies the provider's signature on the raw body, and that it was signed neither too long ago (the
 * SDK's five minutes) nor in the future; anything wrong is a 400 and nothing changes.
 */
export function verifyEvent(stripe: Stripe, rawBody: string, signature: string | null): Stripe.Event {
  if (!signature) throw badRequest('The Stripe-Signature header is missing; the event was ignored.');
  let event: Stripe.Event;
  try {
    event = stripe.webhooks.constructEvent(rawBody, signature, webhookSecret());
  } catch {
    throw badRequest(
      "The webhook signature does not match this server's signing secret (or is too old); the event was ignored.",
    );
  }
  // The SDK refuses old timestamps only; the signed timestamp is `t=` in the header.
  const signedAt = Number(/(?:^|,)\s*t=(\d+)/.exec(signature)?.[1] ?? Number.NaN);
  if (!(signedAt <= Date.now() / 1000 + CLOCK_SKEW_SECONDS))
    throw badRequest('The webhook signature is dated in the future; the event was ignored.');
  return event;
}

/**
 * Handles one provider event: stores it once (a replay is recognised by its id and changes nothing),
 * then brings the trust's subscription up to date from the provider's current object, so events
 * arriving late or out of order cannot leave an old state behind. Payment failures e-mail the admins.
 */
export async function receiveEvent(
  db: Kysely<Database>,
  stripe: Stripe,
  event: Stripe.Event,
): Promise<{ duplicate: boolean }> {
  const seen = await db.selectFrom('payment_events').select('id').where('id', '=', event.id).executeTakeFirst();
  if (seen) return { duplicate: true };
  const subject = subjectOf(event);
  const trustId = await resolveTrust(db, subject);
  const store = async (trx: Transaction<Database> | Kysely<Database>) => {
    const inserted = await trx
      .insertInto('payment_events')
      .values({
        id: event.id,
        type: event.type,
        trust_id: trustId,
        object_id: idOf((event.data.object as unknown as Record<string, unknown>)['id']),
        provider_created_at: new Date(event.created * 1000),
        payload: JSON.stringify(event),
      })
      .onConflict((oc) => oc.column('id').doNothing())
      .returning('id')
      .executeTakeFirst();
    return Boolean(inserted);
  };
  if (!trustId) return { duplicate: !(await store(db)) };
  const stored = await withBillingLock(db, trustId, async (trx) => {
    if (!(await store(trx))) return false;
    if (event.type === 'checkout.session.completed') {
      await trx
        .updateTable('billing_accounts')
        .set({ open_checkout_session_id: null })
        .where('trust_id', '=', trustId)
        .execute();
    }
    // Read inside the lock: whatever order events come in, the last one stores the freshest state. A
    // subscription of another customer than the trust's own is not the trust's, whatever the event says.
    const fetched = subject.subscriptionId ? await readSubscriptionIfExists(stripe, subject.subscriptionId) : null;
    const owner = (await getBillingAccount(trx, trustId)).customerId;
    const state = fetched && fetched.customerId === owner ? fetched : null;
    if (
      state &&
      LIVE.has(state.status) &&
      (await cancelIfSecondSubscription(trx, stripe, trustId, state.subscriptionId))
    )
      return true;
    if (state)
      await applySubscriptionState(
        trx,
        { ...state, trustId },
        { actorUserId: null, actorEmail: 'payment provider' },
        `provider event ${event.type}`,
      );
    return true;
  });
  if (stored && event.type === 'invoice.payment_failed') {
    await notifyPaymentFailed(db, trustId, event.data.object as Stripe.Invoice).catch((error: unknown) => {
      console.error('Could not send the payment-failed e-mail', error);
    });
  }
  return { duplicate: !stored };
}

/**
 * A trust has one subscription. When a second live one appears (two checkout pages paid one after
 * the other before the first confirmation arrived) while the one we hold is still live at the
 * provider, the newcomer is cancelled there straight away, the trust keeps the subscription it had,
 * and the audit trail says so.
 */
async function cancelIfSecondSubscription(
  trx: Transaction<Database>,
  stripe: Stripe,
  trustId: string,
  subscriptionId: string,
): Promise<boolean> {
  const account = await getBillingAccount(trx, trustId);
  if (!account.subscriptionId || account.subscriptionId === subscriptionId || !LIVE.has(account.status)) return false;
  const held = await readSubscriptionIfExists(stripe, account.subscriptionId);
  if (!held || !LIVE.has(held.status)) return false;
  await stripe.subscriptions.cancel(subscriptionId);
  await recordAudit(trx, {
    trustId,
    actorUserId: null,
    actorEmail: 'payment provider',
    action: 'billing.duplicate_cancelled',
    entityType: 'subscription',
    entityId: subscriptionId,
    summary: `Cancelled a second subscription (${subscriptionId}) from another checkout; the trust keeps its subscription ${account.subscriptionId}. Refund any first payment it took.`,
  });
  return true;
}

/**
 * The trust an event belongs to: the one whose provider customer we stored when it started checkout, or
 * failing that whose stored subscription it is. Never the trust named in the event's metadata, which is
 * not ours to trust.
 */
async function resolveTrust(db: Kysely<Database>, subject: EventSubject): Promise<string | null> {
  if (subject.customerId) {
    const trustId = await trustForCustomer(db, subject.customerId);
    if (trustId) return trustId;
  }
  if (!subject.subscriptionId) return null;
  const row = await db
    .selectFrom('billing_accounts')
    .select('trust_id')
    .where('provider_subscription_id', '=', subject.subscriptionId)
    .executeTakeFirst();
  return row?.trust_id ?? null;
}
