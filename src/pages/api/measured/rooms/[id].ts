import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { notFound } from '../../../../lib/server/http/errors';
import { json, parseQuery } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { getRoomMeasured } from '../../../../lib/server/monitor-logs/measured.service';
import { ComparisonQuerySchema } from '../../../../lib/server/monitor-logs/monitor-logs.schemas';

/** A room's measured seasons (each method named and sourced), its comparison with the model and chart data. */
export const GET = route(async ({ locals, params, url }) => {
  const trust = requirePermission(locals, 'monitoring', 'read');
  const { marginPpm } = parseQuery(url, ComparisonQuerySchema);
  const view = await getRoomMeasured(getDb(), trust, IdParamSchema.parse(params.id), marginPpm);
  if (!view) throw notFound('That room');
  return json(view);
});
