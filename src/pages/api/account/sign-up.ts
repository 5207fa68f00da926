import { requestSignUp } from '../../../lib/server/auth/account.service';
import { SignUpSchema } from '../../../lib/server/auth/auth.schemas';
import { clientIpOf } from '../../../lib/server/auth/client-ip';
import { takeRequest, tooManyRequests } from '../../../lib/server/auth/request-limit';
import { getDb } from '../../../lib/server/db/client';
import { AppError } from '../../../lib/server/http/errors';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/**
 * Creates an account that names a new trust (or accepts an invitation). Answers 202 alike whether or not
 * the address already has an account; the e-mail sent to it says which, and its link signs the new account in.
 */
export const POST = route(async ({ request, clientAddress }) => {
  const wait = takeRequest('signUp', clientIpOf(request, clientAddress));
  if (wait > 0) throw new AppError(429, 'too_many_requests', tooManyRequests(wait));
  const input = await parseJson(request, SignUpSchema);
  await requestSignUp(getDb(), input);
  return json({ status: 'confirmation_sent', email: input.email }, 202);
});
