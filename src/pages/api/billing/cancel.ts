import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { CancelBodySchema } from '../../../lib/server/billing/billing.schemas';
import { setCancelAtPeriodEnd } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Cancels the subscription at the end of the paid period (nothing is deleted). */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  await parseJson(request, CancelBodySchema);
  return json({ billing: await setCancelAtPeriodEnd(getDb(), paymentProvider(), billing, true) });
});
