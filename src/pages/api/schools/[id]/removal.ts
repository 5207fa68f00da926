import { requirePermission } from '../../../../lib/server/auth/guard';
import { schoolCountNotice } from '../../../../lib/server/billing/price-change';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { schoolRemovalImpact } from '../../../../lib/server/estate/schools.service';
import { json } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';

/**
 * What removing the school would take with it (blocks, rooms, assessed rooms, members limited to it), and what it does
 * to a paid plan's subscription (one school fewer), in words, before anyone confirms.
 */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'register', 'delete');
  const id = IdParamSchema.parse(params.id);
  const removal = await schoolRemovalImpact(getDb(), trust, id);
  const subscriptionChange = await schoolCountNotice(getDb(), trust, -1);
  return json({ removal, subscriptionChange: subscriptionChange?.changes ? subscriptionChange.words : null });
});
