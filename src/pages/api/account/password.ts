import { changePassword } from '../../../lib/server/auth/account.service';
import { ChangePasswordSchema } from '../../../lib/server/auth/auth.schemas';
import { unauthenticated } from '../../../lib/server/http/errors';
import { field, isFormPost, parseBody, redirectWithFlash } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Changes the signed-in person's password; their other devices are signed out. */
export const POST = route(async ({ locals, request }) => {
  if (!locals.user) throw unauthenticated();
  const input = await parseBody(request, ChangePasswordSchema, (f) => ({
    currentPassword: field(f, 'currentPassword'),
    newPassword: field(f, 'newPassword'),
  }));
  const session = await changePassword(request.headers, input);
  const message = 'Your password has been changed. Other devices were signed out.';
  if (isFormPost(request)) return redirectWithFlash('/app/account', { kind: 'ok', message }, session);
  const answer = json({ status: 'changed' });
  for (const cookie of session.getSetCookie()) answer.headers.append('set-cookie', cookie);
  return answer;
});
