import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { setCancelAtPeriodEnd } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Takes back a cancellation at period end, so the subscription renews. */
export const POST = route(async ({ locals }) => {
  const billing = requireBillingManager(locals);
  return json({ billing: await setCancelAtPeriodEnd(getDb(), paymentProvider(), billing, false) });
});
