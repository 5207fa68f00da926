import { requirePermission, requireWholeTrust } from '../../../lib/server/auth/guard';
import { QuantityPreviewQuerySchema } from '../../../lib/server/billing/billing.schemas';
import { countEstate } from '../../../lib/server/billing/billing.repository';
import { describeSchoolCountChange } from '../../../lib/server/billing/price-change';
import { paymentProvider, providerConfigured } from '../../../lib/server/billing/provider';
import { getDb } from '../../../lib/server/db/client';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/**
 * What the subscription would become if the trust had `schoolsAfter` schools (the school form and the import call it
 * before adding or removing schools); changes nothing. People who add schools (register create) and trust admins
 * may ask; a member limited to some schools may not, as the answer counts every school of the trust.
 */
export const GET = route(async ({ locals, url }) => {
  const trust = requireWholeTrust(
    requirePermission(locals, 'register', 'create'),
    'see what adding schools does to the subscription',
  );
  const { schoolsAfter } = parseQuery(url, QuantityPreviewQuerySchema);
  const db = getDb();
  const { schools } = await countEstate(db, trust.id);
  const stripe = providerConfigured() ? paymentProvider() : null;
  return json({ preview: await describeSchoolCountChange(db, stripe, trust.id, schools, schoolsAfter) });
});
