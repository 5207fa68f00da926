import { getDb } from '../../../lib/server/db/client';
import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { ListRunsQuerySchema, StartRunSchema } from '../../../lib/server/assessments/assessments.schemas';
import { listRecentRuns, startRun } from '../../../lib/server/assessments/runs.service';
import { json, parseJson, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Starts an assessment of the trust or one school; answers 202 with the run id to poll. */
export const POST = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'assessment', 'run');
  const body = await parseJson(request, StartRunSchema);
  const { id, alreadyRunning } = await startRun(getDb(), trust, actorOf(locals), body);
  return json({ id, alreadyRunning }, 202, { location: `/api/assessments/${id}` });
});

/** The trust's recent runs, newest first. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'assessment', 'read');
  const { limit } = parseQuery(url, ListRunsQuerySchema);
  return json({ runs: await listRecentRuns(getDb(), trust, limit) });
});
