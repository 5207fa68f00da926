import { getDb } from '../../../../lib/server/db/client';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { WhatIfSchema } from '../../../../lib/server/assessments/assessments.schemas';
import { whatIf } from '../../../../lib/server/assessments/room-assessment.service';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { json, parseJson } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';

/** The room re-assessed with changed pupils, openable area or added units; saves nothing, so reading is enough. */
export const POST = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'assessment', 'read');
  const id = IdParamSchema.parse(params.id);
  const body = await parseJson(request, WhatIfSchema);
  return json(await whatIf(getDb(), trust, id, body));
});
