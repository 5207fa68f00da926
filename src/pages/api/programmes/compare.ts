import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { CompareQuerySchema } from '../../../lib/server/programme/programme.schemas';
import { compareProgrammes } from '../../../lib/server/programme/programmes.service';

/** Two or three programmes side by side: headline figures and cumulative benefit against spend. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'programme', 'read');
  const { ids } = parseQuery(url, CompareQuerySchema);
  return json(await compareProgrammes(getDb(), trust, ids));
});
