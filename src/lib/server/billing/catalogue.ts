import type Stripe from 'stripe';
import { BILLING_INTERVALS, PER_SCHOOL_PLAN, type BillingInterval } from './plans';

let cached: Promise<Record<BillingInterval, string>> | undefined;

/**
 * The provider price id for each billing interval of the per-school plan, found by lookup key and
 * created on first use (product and prices), so any provider account works without setup by hand.
 */
export function planPrices(stripe: Stripe): Promise<Record<BillingInterval, string>> {
  cached ??= findOrCreatePrices(stripe).catch((error: unknown) => {
    cached = undefined;
    throw error;
  });
  return cached;
}

async function findOrCreatePrices(stripe: Stripe): Promise<Record<BillingInterval, string>> {
  const keys = BILLING_INTERVALS.map((i) => PER_SCHOOL_PLAN.lookupKeys[i]);
  const existing = await stripe.prices.list({ lookup_keys: keys, active: true, limit: 10 });
  const byKey = new Map(existing.data.map((p) => [p.lookup_key, p]));
  let productId = existing.data[0] ? String(existing.data[0].product) : null;
  const result = {} as Record<BillingInterval, string>;
  for (const interval of BILLING_INTERVALS) {
    const key = PER_SCHOOL_PLAN.lookupKeys[interval];
    const found = byKey.get(key);
    if (found) {
      result[interval] = found.id;
      continue;
    }
    productId ??= (
      await stripe.products.create(
        { name: `Airtally ${PER_SCHOOL_PLAN.name}`, metadata: { plan: PER_SCHOOL_PLAN.id } },
        { idempotencyKey: 'airtally-product-whole-estate' },
      )
    ).id;
    const price = await stripe.prices.create(
      {
        product: productId,
        currency: 'gbp',
        unit_amount: PER_SCHOOL_PLAN.unitAmountPence[interval],
        recurring: { interval },
        lookup_key: key,
        nickname: `${PER_SCHOOL_PLAN.name}, per school per ${interval}`,
      },
      { idempotencyKey: `airtally-price-${key}` },
    );
    result[interval] = price.id;
  }
  return result;
}
