import { z } from 'zod';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { cancelInvitation } from '../../../../lib/server/auth/members.service';
import { getDb } from '../../../../lib/server/db/client';
import { unauthenticated } from '../../../../lib/server/http/errors';
import { formDone, formMethods, isFormPost } from '../../../../lib/server/http/forms';
import { route } from '../../../../lib/server/http/route';

/** Withdraws a pending invitation. */
export const DELETE = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'members', 'invite');
  if (!locals.user) throw unauthenticated();
  await cancelInvitation(
    getDb(),
    { user: locals.user, trust, headers: request.headers },
    z.string().min(1).max(200).parse(params.id),
  );
  return isFormPost(request) ? formDone(request, 'Invitation withdrawn.') : new Response(null, { status: 204 });
});

/** The members page's withdraw button: `_method` DELETE. */
export const POST = formMethods({ DELETE });
