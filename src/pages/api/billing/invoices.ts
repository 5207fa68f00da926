import { getDb } from '../../../lib/server/db/client';
import { requireInvoiceReader } from '../../../lib/server/billing/billing.guard';
import { listInvoices } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's invoices, newest first (trust admins and finance leads). */
export const GET = route(async ({ locals }) => {
  const trust = requireInvoiceReader(locals);
  return json({ invoices: await listInvoices(getDb(), paymentProvider(), trust.id) });
});
