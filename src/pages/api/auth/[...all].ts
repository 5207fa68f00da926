import type { APIRoute } from 'astro';
import { z } from 'zod';
import { requestPasswordReset } from '../../../lib/server/auth/account.service';
import { getAuth } from '../../../lib/server/auth/auth';
import { clientIpOf } from '../../../lib/server/auth/client-ip';
import { takeRequest, tooManyRequests } from '../../../lib/server/auth/request-limit';
import {
  clearSignInFailures,
  recordSignInFailure,
  signInRetryAfterSeconds,
} from '../../../lib/server/auth/sign-in-throttle';
import { AppError, toErrorResponse } from '../../../lib/server/http/errors';
import { CLIENT_IP_HEADER } from '../../../lib/server/http/request-guard';
import { json, parseJson } from '../../../lib/server/http/respond';

const email = z.string().trim().toLowerCase().min(1, 'Enter your e-mail address.').max(254);

/** The sign-in fields better-auth reads; the guard keys its lockout on exactly this e-mail. */
const SignInBody = z.object({
  email,
  password: z.string().min(1, 'Enter your password.').max(128),
  rememberMe: z.boolean().optional(),
});

const PasswordResetBody = z.object({ email: email.pipe(z.email('Enter a valid e-mail address.')) });

/** Sign-in and password links accept JSON only, so what we check is what better-auth reads. */
function requireJson(request: Request): void {
  const type = (request.headers.get('content-type') ?? '').split(';')[0]?.trim().toLowerCase();
  if (type !== 'application/json')
    throw new AppError(415, 'unsupported_media_type', 'Send this request as JSON (Content-Type: application/json).');
}

/** Removes session tokens from better-auth's JSON answers: the session lives in its httpOnly cookie only. */
function withoutTokens(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(withoutTokens);
  if (value && typeof value === 'object')
    return Object.fromEntries(
      Object.entries(value)
        .filter(([key]) => key !== 'token')
        .map(([key, v]) => [key, withoutTokens(v)]),
    );
  return value;
}

async function stripTokens(response: Response): Promise<Response> {
  if (!(response.headers.get('content-type') ?? '').includes('application/json')) return response;
  const text = await response.text();
  const headers = new Headers(response.headers);
  headers.delete('content-length');
  let body = text;
  try {
    body = JSON.stringify(withoutTokens(JSON.parse(text)));
  } catch {
    // Not JSON after all: pass it on unchanged.
  }
  return new Response(body, { status: response.status, statusText: response.statusText, headers });
}

/** Passes a request to better-auth with the caller's address and, when given, a body we have checked. */
function forward(request: Request, clientIp: string, body?: unknown): Promise<Response> {
  const headers = new Headers(request.headers);
  headers.set(CLIENT_IP_HEADER, clientIp);
  const hasBody = request.method !== 'GET' && request.method !== 'HEAD';
  if (body !== undefined) headers.delete('content-length');
  return getAuth().handler(
    new Request(request.url, {
      method: request.method,
      headers,
      ...(hasBody ? { body: body === undefined ? request.body : JSON.stringify(body), duplex: 'half' } : {}),
    } as RequestInit),
  );
}

/** Sign-in with the per-account guard: five wrong passwords for one address from one client lock it for a minute. */
async function signIn(request: Request, clientIp: string): Promise<Response> {
  requireJson(request);
  const body = await parseJson(request, SignInBody);
  const retryAfter = signInRetryAfterSeconds(body.email, clientIp);
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
  const response = await forward(request, clientIp, body);
  if (response.status === 401) recordSignInFailure(body.email, clientIp);
  if (response.ok) clearSignInFailures(body.email, clientIp);
  return stripTokens(response);
}

/** A password link, e-mailed in the background: the answer is the same, and as quick, for every address. */
async function passwordReset(request: Request, clientIp: string): Promise<Response> {
  requireJson(request);
  const wait = takeRequest('passwordReset', clientIp);
  if (wait > 0) throw new AppError(429, 'too_many_requests', tooManyRequests(wait));
  const { email: address } = await parseJson(request, PasswordResetBody);
  requestPasswordReset(address);
  return json({
    status: true,
    message: 'If an account uses this address, we have sent it a link to choose a new password.',
  });
}

/** better-auth's endpoints (sign-in, sign-out, sessions, password reset) under /api/auth. */
export const ALL: APIRoute = async ({ request, clientAddress }) => {
  const path = new URL(request.url).pathname.replace(/\/+$/, '');
  try {
    // Trusts and members are served by our own routes (/api/members, /api/account), which apply membership
    // end dates, school limits and the audit trail; the organization plugin answers only server-side calls.
    if (path.startsWith('/api/auth/organization/'))
      throw new AppError(404, 'not_found', 'Use /api/members and /api/account for trusts and members.');
    const clientIp = clientIpOf(request, clientAddress);
    if (request.method === 'POST' && path === '/api/auth/sign-in/email') return await signIn(request, clientIp);
    if (request.method === 'POST' && path === '/api/auth/request-password-reset')
      return await passwordReset(request, clientIp);
    return await stripTokens(await forward(request, clientIp));
  } catch (error) {
    return toErrorResponse(error);
  }
};
