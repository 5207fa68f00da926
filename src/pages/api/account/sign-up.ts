import { signUp } from '../../../lib/server/auth/account.service';
import { SignUpSchema } from '../../../lib/server/auth/auth.schemas';
import { clientIpOf } from '../../../lib/server/auth/client-ip';
import { takeRequest, tooManyRequests } from '../../../lib/server/auth/request-limit';
import { getDb } from '../../../lib/server/db/client';
import { AppError } from '../../../lib/server/http/errors';
import { parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** Creates an account that names a new trust (or accepts an invitation) and signs it in. */
export const POST = route(async ({ request, clientAddress }) => {
  const wait = takeRequest('signUp', clientIpOf(request, clientAddress));
  if (wait > 0) throw new AppError(429, 'too_many_requests', tooManyRequests(wait));
  const input = await parseJson(request, SignUpSchema);
  const result = await signUp(getDb(), input, request.headers);
  const headers = new Headers({ 'content-type': 'application/json; charset=utf-8' });
  for (const cookie of result.headers.getSetCookie()) headers.append('set-cookie', cookie);
  return new Response(JSON.stringify({ user: result.user, trust: result.trust }), { status: 201, headers });
});
