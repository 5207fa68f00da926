import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { financeReport } from '../../../lib/server/portfolio/finance.repository';
import { FinanceQuerySchema } from '../../../lib/server/portfolio/portfolio.schemas';

/** Payback per recommended unit with school subtotals, trust totals, the baseline in words and the sensitivity. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'portfolio', 'read');
  const query = parseQuery(url, FinanceQuerySchema);
  return json(await financeReport(getDb(), trust, query));
});
