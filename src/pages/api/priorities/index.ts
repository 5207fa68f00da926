import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { PrioritiesQuerySchema } from '../../../lib/server/portfolio/portfolio.schemas';
import { listPriorities } from '../../../lib/server/portfolio/priorities.repository';

/** A page of the trust's ranked rooms, sorted, filtered and (with wRisk/wCost/wPayback) re-weighted on the server. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'portfolio', 'read');
  const query = parseQuery(url, PrioritiesQuerySchema);
  return json(await listPriorities(getDb(), trust, query));
});
