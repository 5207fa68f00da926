import { resendVerification } from '../../../lib/server/auth/account.service';
import { getDb } from '../../../lib/server/db/client';
import { badRequest, unauthenticated } from '../../../lib/server/http/errors';
import { formDone, isFormPost } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Sends the signed-in person a new link to confirm their e-mail address. */
export const POST = route(async ({ locals, request }) => {
  const user = locals.user;
  if (!user) throw unauthenticated();
  if (user.emailVerified) throw badRequest('Your e-mail address is already confirmed.');
  await resendVerification(getDb(), user, request.headers);
  const message = `We have sent a new confirmation link to ${user.email}.`;
  return isFormPost(request) ? formDone(request, message) : json({ status: 'sent', email: user.email }, 202);
});
