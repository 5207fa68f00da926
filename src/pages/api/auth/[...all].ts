import type { APIRoute } from 'astro';
import { CLIENT_IP_HEADER, getAuth } from '../../../lib/server/auth/auth';
import { clientIpOf } from '../../../lib/server/auth/client-ip';
import {
  clearSignInFailures,
  recordSignInFailure,
  signInRetryAfterSeconds,
} from '../../../lib/server/auth/sign-in-throttle';
import { json } from '../../../lib/server/http/respond';

/** Reads the e-mail address of a JSON sign-in request without consuming the original body. */
async function emailOf(request: Request): Promise<string> {
  try {
    const body = (await request.clone().json()) as { email?: unknown };
    return typeof body.email === 'string' ? body.email : '';
  } catch {
    return '';
  }
}

/** better-auth's endpoints (sign-in, sign-out, sessions, password reset, organisations) under /api/auth. */
export const ALL: APIRoute = async ({ request, clientAddress }) => {
  // Trusts and members are served by our own routes (/api/members, /api/account), which apply membership
  // end dates, school limits and the audit trail; the organization plugin answers only server-side calls.
  if (new URL(request.url).pathname.startsWith('/api/auth/organization/')) {
    return json(
      {
        error: {
          code: 'not_found',
          message: 'Use /api/members and /api/account for trusts and members.',
          details: null,
        },
      },
      404,
    );
  }
  const clientIp = clientIpOf(request, clientAddress);
  const headers = new Headers(request.headers);
  headers.set(CLIENT_IP_HEADER, clientIp);
  const hasBody = request.method !== 'GET' && request.method !== 'HEAD';
  const forwarded = new Request(request.url, {
    method: request.method,
    headers,
    ...(hasBody ? { body: await request.clone().arrayBuffer() } : {}),
  });

  const isSignIn = new URL(request.url).pathname === '/api/auth/sign-in/email' && request.method === 'POST';
  if (!isSignIn) return getAuth().handler(forwarded);

  const email = await emailOf(request);
  const retryAfter = signInRetryAfterSeconds(email, clientIp);
  if (retryAfter > 0) {
    return json(
      {
        error: {
          code: 'too_many_attempts',
          message: `Too many wrong passwords. Wait ${retryAfter} seconds, then try again or reset your password.`,
          details: { retryAfterSeconds: retryAfter },
        },
      },
      429,
      { 'retry-after': String(retryAfter) },
    );
  }
  const response = await getAuth().handler(forwarded);
  if (response.status === 401) recordSignInFailure(email, clientIp);
  if (response.ok) clearSignInFailures(email, clientIp);
  return response;
};
