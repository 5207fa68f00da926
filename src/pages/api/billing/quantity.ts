import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { billingOverview, syncQuantity } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { formDone, isFormPost } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/**
 * Brings the number of schools paid for in line with the trust's schools (prorated), when adding schools could not
 * reach the payment provider. The billing page offers it; showing the page never changes the subscription.
 */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  const db = getDb();
  await syncQuantity(db, paymentProvider(), billing.trust.id, billing.actor);
  const overview = await billingOverview(db, billing.trust.id);
  if (isFormPost(request)) return formDone(request, `The subscription now covers ${overview.quantity} schools.`);
  return json({ billing: overview });
});
