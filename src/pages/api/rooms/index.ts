import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { listRooms } from '../../../lib/server/estate/rooms.repository';
import { RoomListQuerySchema } from '../../../lib/server/estate/estate.schemas';
import { json, parseJson, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { RoomCreateSchema } from '../../../lib/server/estate/estate.schemas';
import { createRoom } from '../../../lib/server/estate/rooms.service';

/** A page of rooms, sorted and filtered on the server. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  const query = parseQuery(url, RoomListQuerySchema);
  return json(await listRooms(getDb(), trust, query));
});

/** Adds a room, validated as an imported row would be. */
export const POST = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'register', 'create');
  const input = await parseJson(request, RoomCreateSchema);
  return json(await createRoom(getDb(), trust, actorOf(locals), input), 201);
});
