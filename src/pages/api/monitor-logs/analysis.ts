import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { forbidden } from '../../../lib/server/http/errors';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { getAnalysisRun, requestAnalysis } from '../../../lib/server/monitor-logs/analysis.service';
import { AnalysisRequestSchema } from '../../../lib/server/monitor-logs/monitor-logs.schemas';

/** The trust's latest analysis of its readings, with progress. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'monitoring', 'read');
  return json({ run: await getAnalysisRun(getDb(), trust.id, null) });
});

/** Analyses every room with readings again (after the assumptions or the register changed). */
export const POST = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'monitoring', 'import');
  await parseJson(request, AnalysisRequestSchema);
  if (trust.schoolIds) throw forbidden('re-analyse the whole trust (your access is limited to some schools)');
  const id = await requestAnalysis(getDb(), trust.id, null, locals.user?.email ?? null);
  return json({ run: await getAnalysisRun(getDb(), trust.id, id) }, 202);
});
