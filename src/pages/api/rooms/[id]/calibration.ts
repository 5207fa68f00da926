import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { json } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import {
  calibrate,
  listCalibrations,
  revertCalibration,
} from '../../../../lib/server/monitor-logs/calibration.service';

/** The room's calibration versions, newest first. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'monitoring', 'read');
  return json({ versions: await listCalibrations(getDb(), trust, IdParamSchema.parse(params.id)) });
});

/** Calibrates the room's window use and infiltration from its measured seasons (a new version). */
export const POST = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'monitoring', 'calibrate');
  return json({ version: await calibrate(getDb(), trust, actorOf(locals), IdParamSchema.parse(params.id)) }, 201);
});

/** Reverts the room to its uncalibrated model. */
export const DELETE = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'monitoring', 'calibrate');
  await revertCalibration(getDb(), trust, actorOf(locals), IdParamSchema.parse(params.id));
  return new Response(null, { status: 204 });
});
