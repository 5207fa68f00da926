import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { listComparison } from '../../../lib/server/monitor-logs/measured.service';
import { ComparisonQuerySchema } from '../../../lib/server/monitor-logs/monitor-logs.schemas';

/** Measured rooms against the model, those contradicting it by more than the margin (ppm) first. */
export const GET = route(async ({ locals, url }) => {
  const trust = requirePermission(locals, 'monitoring', 'read');
  const query = parseQuery(url, ComparisonQuerySchema);
  return json(await listComparison(getDb(), trust, query.marginPpm, query.schoolId ?? null));
});
