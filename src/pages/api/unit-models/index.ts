import { getDb } from '../../../lib/server/db/client';
import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission, requireWholeTrust } from '../../../lib/server/auth/guard';
import { UnitCatalogueSchema } from '../../../lib/server/assessments/assessments.schemas';
import {
  getAssumptionsView,
  requireAssumptionEditor,
  saveUnitCatalogue,
} from '../../../lib/server/assessments/assumptions.service';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's catalogue of generic heat-recovery unit models (part of the current assumption set). */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'assumptions', 'read');
  const view = await getAssumptionsView(getDb(), trust);
  return json({ models: view.catalogue, version: view.version, label: view.label });
});

/** Replaces the catalogue as a new assumption version (technical fields vs costs are checked per role). */
export const PUT = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'assumptions', 'read');
  requireAssumptionEditor(trust);
  requireWholeTrust(trust, 'change the unit catalogue');
  const body = await parseJson(request, UnitCatalogueSchema);
  const saved = await saveUnitCatalogue(getDb(), trust, actorOf(locals), body);
  return json({ id: saved.id, version: saved.version, label: saved.label }, 201);
});
