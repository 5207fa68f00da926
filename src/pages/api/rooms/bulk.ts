import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { RoomBulkSchema } from '../../../lib/server/estate/estate.schemas';
import { bulkRooms } from '../../../lib/server/estate/rooms.service';

/** The same change to many rooms ({ action: "update", ids, changes }) or their deletion ({ action: "delete", ids }); all or none. */
export const POST = route(async ({ locals, request }) => {
  requirePermission(locals, 'register', 'update');
  const body = await parseJson(request, RoomBulkSchema);
  const trust = requirePermission(locals, 'register', body.action === 'delete' ? 'delete' : 'update');
  return json(await bulkRooms(getDb(), trust, actorOf(locals), body));
});
