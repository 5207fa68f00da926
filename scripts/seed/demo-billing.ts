import type { Kysely } from 'kysely';
import type { Database } from '../../db/database';
import { countEstate, getBillingAccount } from '../../src/lib/server/billing/billing.repository';
import { billableSchools } from '../../src/lib/server/billing/billing.service';
import { planPrices } from '../../src/lib/server/billing/catalogue';
import { paymentProvider, providerConfigured } from '../../src/lib/server/billing/provider';
import { applySubscriptionState, readSubscription } from '../../src/lib/server/billing/subscription-sync';
import { DEMO_TRUST } from './demo-trust';

/**
 * Puts the demo trust on the paid per-school plan, in the payment provider (through the SDK, so the
 * subscription exists wherever the app points) and in our billing tables. Idempotent: when the
 * stored subscription still exists at the provider nothing happens. Returns what it did.
 */
export async function seedDemoBilling(db: Kysely<Database>): Promise<string> {
  if (!providerConfigured()) return 'skipped: STRIPE_SECRET_KEY is not set';
  const stripe = paymentProvider();
  const account = await getBillingAccount(db, DEMO_TRUST.id);
  if (account.subscriptionId) {
    const existing = await stripe.subscriptions.retrieve(account.subscriptionId).catch(() => null);
    if (existing) return 'already present';
  }
  const prices = await planPrices(stripe);
  const { schools } = await countEstate(db, DEMO_TRUST.id);
  const customer = await stripe.customers.create({
    name: DEMO_TRUST.name,
    email: 'trust.admin@demo.airtally.test',
    metadata: { trust_id: DEMO_TRUST.id },
    payment_method: 'pm_card_visa',
    invoice_settings: { default_payment_method: 'pm_card_visa' },
  });
  const subscription = await stripe.subscriptions.create({
    customer: customer.id,
    items: [{ price: prices.month, quantity: billableSchools(schools) }],
    metadata: { trust_id: DEMO_TRUST.id },
  });
  const state = await readSubscription(stripe, subscription.id);
  await db
    .transaction()
    .execute((trx) => applySubscriptionState(trx, state, { actorUserId: null, actorEmail: null }, 'demo data'));
  return `created ${subscription.id} for ${billableSchools(schools)} schools`;
}
