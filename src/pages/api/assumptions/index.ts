import { getDb } from '../../../lib/server/db/client';
import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission, requireWholeTrust } from '../../../lib/server/auth/guard';
import { AssumptionEditSchema } from '../../../lib/server/assessments/assessments.schemas';
import {
  editAssumptions,
  getAssumptionsView,
  requireAssumptionEditor,
} from '../../../lib/server/assessments/assumptions.service';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's current assumption set (every value with its source, status and kind) and its version history. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'assumptions', 'read');
  return json(await getAssumptionsView(getDb(), trust));
});

/** Saves changed values as a new version; each value's kind decides which role may change it. */
export const PATCH = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'assumptions', 'read');
  requireAssumptionEditor(trust);
  requireWholeTrust(trust, 'change assumptions');
  const body = await parseJson(request, AssumptionEditSchema);
  const saved = await editAssumptions(getDb(), trust, actorOf(locals), body);
  return json({ id: saved.id, version: saved.version, label: saved.label }, 201);
});
