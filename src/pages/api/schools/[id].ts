import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { getSchool } from '../../../lib/server/estate/estate.repository';
import { IdParamSchema } from '../../../lib/server/estate/estate.schemas';
import { notFound } from '../../../lib/server/http/errors';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** One school with its blocks. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  const id = IdParamSchema.parse(params.id);
  const school = await getSchool(getDb(), trust, id);
  if (!school) throw notFound('That school');
  return json({ school });
});
