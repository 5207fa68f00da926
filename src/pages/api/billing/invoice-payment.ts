import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { InvoicePaymentBodySchema } from '../../../lib/server/billing/billing.schemas';
import { latestInvoicePaymentRequest, requestInvoicePayment } from '../../../lib/server/billing/invoice-payment';
import { getDb } from '../../../lib/server/db/client';
import { formDone, isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's newest request to pay by invoice (trust admins only). */
export const GET = route(async ({ locals }) => {
  const { trust } = requireBillingManager(locals);
  return json({ request: await latestInvoicePaymentRequest(getDb(), trust.id) });
});

/** Asks to pay by invoice against a purchase order: stored, audited, e-mailed to the billing contact and ops. */
export const POST = route(async ({ locals, request }) => {
  const billing = requireBillingManager(locals);
  const input = await parseBody(request, InvoicePaymentBodySchema);
  const saved = await requestInvoicePayment(getDb(), billing, input);
  if (isFormPost(request))
    return formDone(
      request,
      `Invoice payment requested with purchase order ${saved.purchaseOrder}; we have e-mailed ${saved.billingEmail}.`,
    );
  return json({ request: saved }, 201);
});
