import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { PeriodBodySchema } from '../../../lib/server/billing/billing.schemas';
import { changeInterval } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { formDone, isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Switches the subscription between monthly and yearly billing. */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  const { interval, prorationDate } = await parseBody(request, PeriodBodySchema);
  const overview = await changeInterval(getDb(), paymentProvider(), billing, interval, prorationDate);
  if (isFormPost(request))
    return formDone(request, `Billing period changed to ${interval === 'year' ? 'yearly' : 'monthly'}.`);
  return json({ billing: overview });
});
