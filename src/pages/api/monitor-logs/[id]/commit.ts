import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { json, parseJson } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { commitLog } from '../../../../lib/server/monitor-logs/import.service';
import { CommitLogSchema } from '../../../../lib/server/monitor-logs/monitor-logs.schemas';

/** Commits a previewed log in one transaction ({ action: "commit" }) or drops it ({ action: "cancel" }). */
export const POST = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'monitoring', 'import');
  const id = IdParamSchema.parse(params.id);
  const body = await parseJson(request, CommitLogSchema);
  return json({ id, ...(await commitLog(getDb(), trust, actorOf(locals), id, body.action)) });
});
