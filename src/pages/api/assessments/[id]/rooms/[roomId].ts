import { requirePermission } from '../../../../../lib/server/auth/guard';
import { RunIdSchema } from '../../../../../lib/server/assessments/assessments.schemas';
import { getRunRoomDetail } from '../../../../../lib/server/assessments/room-assessment.service';
import { IdParamSchema } from '../../../../../lib/server/estate/estate.schemas';
import { json } from '../../../../../lib/server/http/respond';
import { getDb } from '../../../../../lib/server/db/client';
import { route } from '../../../../../lib/server/http/route';

/** A room as a run assessed it: the inputs the run kept, the assessment recomputed from them, and the stored figures. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'assessment', 'read');
  const runId = RunIdSchema.parse(params.id);
  const roomId = IdParamSchema.parse(params.roomId);
  return json(await getRunRoomDetail(getDb(), trust, runId, roomId));
});
