import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { CancelBodySchema } from '../../../lib/server/billing/billing.schemas';
import { setCancelAtPeriodEnd } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { field, formDone, isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Cancels the subscription at the end of the paid period (nothing is deleted). */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  await parseBody(request, CancelBodySchema, (f) => ({ atPeriodEnd: field(f, 'atPeriodEnd') === 'true' }));
  const overview = await setCancelAtPeriodEnd(getDb(), paymentProvider(), billing, true);
  if (isFormPost(request))
    return formDone(
      request,
      'The subscription will end at the end of the paid period. Nothing is deleted; you can resume until then.',
    );
  return json({ billing: overview });
});
