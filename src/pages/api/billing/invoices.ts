import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { listInvoices } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's invoices, newest first. */
export const GET = route(async ({ locals }) => {
  const { trust } = requireBillingManager(locals);
  return json({ invoices: await listInvoices(getDb(), paymentProvider(), trust.id) });
});
