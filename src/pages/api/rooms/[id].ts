import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { getRoom } from '../../../lib/server/estate/rooms.repository';
import { IdParamSchema } from '../../../lib/server/estate/estate.schemas';
import { notFound } from '../../../lib/server/http/errors';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { deleteRoom, updateRoom } from '../../../lib/server/estate/rooms.service';
import { RoomPatchInputSchema } from '../../../lib/server/register/cell-edits';

/** One room with every attribute. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  const id = IdParamSchema.parse(params.id);
  const room = await getRoom(getDb(), trust, id);
  if (!room) throw notFound('That room');
  return json({ room });
});

/** Changes some attributes of a room (typed text such as "1.6 m2" or "SW" read as the import reads it); re-checked as on import. */
export const PATCH = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'register', 'update');
  const id = IdParamSchema.parse(params.id);
  const patch = await parseJson(request, RoomPatchInputSchema);
  const result = await updateRoom(getDb(), trust, actorOf(locals), id, patch);
  return json({ ...result, room: await getRoom(getDb(), trust, id) });
});

/** Deletes a room. */
export const DELETE = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'register', 'delete');
  const id = IdParamSchema.parse(params.id);
  await deleteRoom(getDb(), trust, actorOf(locals), id);
  return new Response(null, { status: 204 });
});
