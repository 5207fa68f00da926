import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { BlockCreateSchema } from '../../../lib/server/estate/estate.schemas';
import { createBlock } from '../../../lib/server/estate/blocks.service';

/** Adds a block to a school. */
export const POST = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'register', 'create');
  const input = await parseJson(request, BlockCreateSchema);
  return json(await createBlock(getDb(), trust, actorOf(locals), input), 201);
});
