import { getDb } from '../../../lib/server/db/client';
import { requireBillingManager } from '../../../lib/server/billing/billing.guard';
import { PeriodPreviewQuerySchema } from '../../../lib/server/billing/billing.schemas';
import { previewPeriodChange } from '../../../lib/server/billing/price-change';
import { paymentProvider } from '../../../lib/server/billing/provider';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** What switching the billing period would cost now (amount, proration), from the provider's preview; changes nothing. */
export const GET = route(async ({ locals, url }) => {
  const { trust } = requireBillingManager(locals);
  const { interval } = parseQuery(url, PeriodPreviewQuerySchema);
  return json({ preview: await previewPeriodChange(getDb(), paymentProvider(), trust.id, interval) });
});
