import { signUp } from '../../../lib/server/auth/account.service';
import { SignUpSchema } from '../../../lib/server/auth/auth.schemas';
import { getDb } from '../../../lib/server/db/client';
import { parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Creates an account that names a new trust (or accepts an invitation) and signs it in. */
export const POST = route(async ({ request }) => {
  const input = await parseJson(request, SignUpSchema);
  const result = await signUp(getDb(), input, request.headers);
  const headers = new Headers({ 'content-type': 'application/json; charset=utf-8' });
  for (const cookie of result.headers.getSetCookie()) headers.append('set-cookie', cookie);
  return new Response(JSON.stringify({ user: result.user, trust: result.trust }), { status: 201, headers });
});
