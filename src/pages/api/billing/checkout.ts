import { requireVerifiedEmail } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { CheckoutBodySchema } from '../../../lib/server/billing/billing.schemas';
import { startCheckout } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { field, isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Starts the upgrade to the per-school plan; answers the hosted checkout page to open (a form goes straight there). */
export const POST = route(async ({ locals, request, redirect }) => {
  const billing = requireBillingManager(locals);
  requireVerifiedEmail(locals);
  const { interval } = await parseBody(request, CheckoutBodySchema, (f) => ({
    interval: field(f, 'interval') || undefined,
  }));
  const checkout = await startCheckout(getDb(), paymentProvider(), billing, interval);
  return isFormPost(request) ? redirect(checkout.url, 303) : json(checkout, 201);
});
