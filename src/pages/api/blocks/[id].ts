import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { IdParamSchema } from '../../../lib/server/estate/estate.schemas';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { BlockPatchSchema } from '../../../lib/server/estate/estate.schemas';
import { deleteBlock, updateBlock } from '../../../lib/server/estate/blocks.service';

/** Changes a block's attributes. */
export const PATCH = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'register', 'update');
  const id = IdParamSchema.parse(params.id);
  const patch = await parseJson(request, BlockPatchSchema);
  return json(await updateBlock(getDb(), trust, actorOf(locals), id, patch));
});

/** Deletes a block; its rooms stay in the school without a block. */
export const DELETE = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'register', 'delete');
  const id = IdParamSchema.parse(params.id);
  await deleteBlock(getDb(), trust, actorOf(locals), id);
  return new Response(null, { status: 204 });
});
