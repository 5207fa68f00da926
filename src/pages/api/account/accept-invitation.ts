import { z } from 'zod';
import { acceptInvitation } from '../../../lib/server/auth/account.service';
import { getDb } from '../../../lib/server/db/client';
import { unauthenticated } from '../../../lib/server/http/errors';
import { isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

const AcceptSchema = z.object({ invitationId: z.string().trim().min(1, 'The invitation id is missing.').max(200) });

/** Accepts an invitation sent to the signed-in person's address and switches to that trust (a form lands in the app). */
export const POST = route(async ({ locals, request, redirect }) => {
  if (!locals.user) throw unauthenticated();
  const { invitationId } = await parseBody(request, AcceptSchema);
  const trust = await acceptInvitation(getDb(), invitationId, locals.user, request.headers);
  return isFormPost(request) ? redirect('/app?joined=1', 303) : json({ trust });
});
