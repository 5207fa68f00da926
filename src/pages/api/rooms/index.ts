import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { listRooms } from '../../../lib/server/estate/estate.repository';
import { RoomListQuerySchema } from '../../../lib/server/estate/estate.schemas';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** A page of rooms, sorted and filtered on the server. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  const query = parseQuery(url, RoomListQuerySchema);
  return json(await listRooms(getDb(), trust, query));
});
