import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { json } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { getImport } from '../../../../lib/server/register/import.service';

/** One import with its problems and outcome. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  const viewer = { trust, userId: actorOf(locals).actorUserId ?? '' };
  return json({ import: await getImport(getDb(), viewer, IdParamSchema.parse(params.id)) });
});
