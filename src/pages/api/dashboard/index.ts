import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { dashboard } from '../../../lib/server/portfolio/dashboard.repository';

/** The trust's headline figures and the data of the dashboard charts. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'portfolio', 'read');
  return json(await dashboard(getDb(), trust));
});
