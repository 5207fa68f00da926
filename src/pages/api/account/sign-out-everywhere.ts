import { z } from 'zod';
import { signOutEverywhere } from '../../../lib/server/auth/account.service';
import { unauthenticated } from '../../../lib/server/http/errors';
import { field, isFormPost, parseBody } from '../../../lib/server/http/forms';
import { route } from '../../../lib/server/http/route';

/** An explicit confirmation, so a stray request cannot sign someone out on every device. */
const SignOutEverywhereSchema = z.object({
  everywhere: z.literal(true, { message: 'Send { "everywhere": true } to sign out on every device.' }),
});

/** Signs the person out on every device, this one included (a form lands on the sign-in page). */
export const POST = route(async ({ locals, request }) => {
  if (!locals.user) throw unauthenticated();
  await parseBody(request, SignOutEverywhereSchema, (f) => ({ everywhere: field(f, 'everywhere') === 'true' }));
  const cleared = await signOutEverywhere(request.headers);
  const response = isFormPost(request)
    ? new Response(null, { status: 303, headers: { location: '/sign-in?notice=signed-out' } })
    : new Response(null, { status: 204 });
  for (const cookie of cleared.getSetCookie()) response.headers.append('set-cookie', cookie);
  return response;
});
