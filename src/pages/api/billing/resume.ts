import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { setCancelAtPeriodEnd } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { formDone, isFormPost } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Takes back a cancellation at period end, so the subscription renews. */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  const overview = await setCancelAtPeriodEnd(getDb(), paymentProvider(), billing, false);
  return isFormPost(request) ? formDone(request, 'The subscription will renew as usual.') : json({ billing: overview });
});
