import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { RetentionSchema } from '../../../lib/server/assessments/assessments.schemas';
import { getRetention, saveRetention } from '../../../lib/server/assessments/retention.service';
import { getDb } from '../../../lib/server/db/client';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** How many of the latest runs keep their results (the default until the trust admin chooses). */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'assessment', 'read');
  return json(await getRetention(getDb(), trust.id));
});

/** Sets the retention rule (audited) and removes the results of runs beyond it at once. */
export const PUT = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'assessment', 'manage');
  const { keepRuns } = await parseJson(request, RetentionSchema);
  return json(await saveRetention(getDb(), trust.id, keepRuns, actorOf(locals)));
});
