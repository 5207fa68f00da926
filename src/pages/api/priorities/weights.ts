import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission, requireWholeTrust } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { WeightsSchema } from '../../../lib/server/portfolio/portfolio.schemas';
import { getWeightSettings, saveWeights } from '../../../lib/server/portfolio/ranking.repository';

/** The trust's ranking weights (the engine's defaults until someone saves them). */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'portfolio', 'read');
  return json(await getWeightSettings(getDb(), trust.id));
});

/** Saves the trust's ranking weights (audited) and re-ranks its rooms with them. */
export const PUT = route(async ({ locals, request }) => {
  const trust = requireWholeTrust(requirePermission(locals, 'portfolio', 'save_weights'), 'save ranking weights');
  const weights = await parseJson(request, WeightsSchema);
  return json(await saveWeights(getDb(), trust.id, weights, actorOf(locals)));
});
