import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { getRoom } from '../../../lib/server/estate/estate.repository';
import { IdParamSchema } from '../../../lib/server/estate/estate.schemas';
import { notFound } from '../../../lib/server/http/errors';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** One room with every attribute. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  const id = IdParamSchema.parse(params.id);
  const room = await getRoom(getDb(), trust, id);
  if (!room) throw notFound('That room');
  return json({ room });
});
