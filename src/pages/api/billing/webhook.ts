import { getDb } from '../../../lib/server/db/client';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { receiveEvent, verifyEvent } from '../../../lib/server/billing/webhook.service';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/**
 * The payment provider's events. No session: the signature over the raw body is the proof
 * (bad or missing → 400, nothing stored). A 5xx makes the provider retry later.
 */
export const POST = route(async ({ request }) => {
  const stripe = paymentProvider();
  const event = verifyEvent(stripe, await request.text(), request.headers.get('stripe-signature'));
  const { duplicate } = await receiveEvent(getDb(), stripe, event);
  return json({ received: true, duplicate });
});
