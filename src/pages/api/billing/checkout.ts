import { requireVerifiedEmail } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { CheckoutBodySchema } from '../../../lib/server/billing/billing.schemas';
import { startCheckout } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Starts the upgrade to the per-school plan; answers the hosted checkout page to open. */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  requireVerifiedEmail(locals);
  const { interval } = await parseJson(request, CheckoutBodySchema);
  return json(await startCheckout(getDb(), paymentProvider(), billing, interval), 201);
});
