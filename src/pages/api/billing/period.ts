import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { PeriodBodySchema } from '../../../lib/server/billing/billing.schemas';
import { changeInterval } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Switches the subscription between monthly and yearly billing. */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  const { interval } = await parseJson(request, PeriodBodySchema);
  return json({ billing: await changeInterval(getDb(), paymentProvider(), billing, interval) });
});
