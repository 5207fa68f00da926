import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { billingOverview, upcomingInvoice } from '../../../lib/server/billing/billing.service';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's plan, standing, school count and next invoice (trust admins only). */
export const GET = route(async ({ locals }) => {
  const { trust } = requireBillingManager(locals);
  const overview = await billingOverview(getDb(), trust.id);
  const upcoming = overview.plan === 'per_school' ? await upcomingInvoice(getDb(), paymentProvider(), trust.id) : null;
  return json({ billing: overview, upcoming });
});
