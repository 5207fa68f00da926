import { switchTrust } from '../../../lib/server/auth/account.service';
import { ActiveTrustSchema } from '../../../lib/server/auth/auth.schemas';
import { getDb } from '../../../lib/server/db/client';
import { unauthenticated } from '../../../lib/server/http/errors';
import { isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Switches the session to another of the person's trusts; a form post returns to the app. */
export const POST = route(async ({ locals, request, redirect }) => {
  if (!locals.user) throw unauthenticated();
  const { trustId } = await parseBody(request, ActiveTrustSchema);
  const membership = await switchTrust(getDb(), locals.user.id, trustId, request.headers);
  if (isFormPost(request)) return redirect('/app', 303);
  return json({
    trust: {
      id: membership.trustId,
      name: membership.trustName,
      role: membership.role,
      schoolIds: membership.schoolIds,
    },
  });
});
