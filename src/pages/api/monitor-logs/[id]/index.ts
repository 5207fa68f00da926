import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { json } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { deleteLog } from '../../../../lib/server/monitor-logs/import.service';
import { getLog } from '../../../../lib/server/monitor-logs/logs.repository';

/** One log with its sensors, matches and problems. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'monitoring', 'read');
  return json({ log: await getLog(getDb(), trust, locals.user?.id ?? null, IdParamSchema.parse(params.id)) });
});

/** Deletes a log's readings (exactly those); the rooms it touched are analysed again. */
export const DELETE = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'monitoring', 'import');
  return json(await deleteLog(getDb(), trust, actorOf(locals), IdParamSchema.parse(params.id)));
});
