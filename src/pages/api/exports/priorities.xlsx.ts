import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { PrioritiesQuerySchema } from '../../../lib/server/portfolio/portfolio.schemas';
import { exportPriorities } from '../../../lib/server/portfolio/priorities-export';

/** The priorities list as the person sees it (filters, sort, weights; every page) in .xlsx, with a Cautions sheet. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'portfolio', 'export');
  const query = parseQuery(url, PrioritiesQuerySchema);
  const bytes = await exportPriorities(getDb(), trust, query);
  return new Response(new Uint8Array(bytes), {
    headers: {
      'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      'content-disposition': `attachment; filename="airtally-priorities-${new Date().toISOString().slice(0, 10)}.xlsx"`,
    },
  });
});
