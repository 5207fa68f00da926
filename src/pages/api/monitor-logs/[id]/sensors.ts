import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { json, parseJson } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { mapSensors } from '../../../../lib/server/monitor-logs/import.service';
import { MapSensorsSchema } from '../../../../lib/server/monitor-logs/monitor-logs.schemas';

/** Chooses the room of some sensors (null leaves a sensor out); Airtally remembers the choice. */
export const PATCH = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'monitoring', 'import');
  const id = IdParamSchema.parse(params.id);
  const body = await parseJson(request, MapSensorsSchema);
  return json({ log: await mapSensors(getDb(), trust, actorOf(locals), id, body.sensors) });
});
