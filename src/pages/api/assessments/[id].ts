import { getDb } from '../../../lib/server/db/client';
import { requirePermission } from '../../../lib/server/auth/guard';
import { RunIdSchema } from '../../../lib/server/assessments/assessments.schemas';
import { getRunStatus } from '../../../lib/server/assessments/runs.service';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Status and progress of one run: { status, roomsDone, roomsTotal, startedAt, finishedAt, error? }. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'assessment', 'read');
  const id = RunIdSchema.parse(params.id);
  return json(await getRunStatus(getDb(), trust, id));
});
