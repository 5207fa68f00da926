import { defineMiddleware } from 'astro:middleware';
import { getAuth } from './lib/server/auth/auth';
import { billingWriteGate } from './lib/server/billing/write-gate';
import { listMemberships, setSessionTrust } from './lib/server/auth/membership.repository';
import { getDb } from './lib/server/db/client';
import { methodNotAllowed, toErrorResponse } from './lib/server/http/errors';
import { BODY_TOO_LARGE_HEADER, bodyTooLarge, mustCloseUnreadBody } from './lib/server/http/request-guard';

/** Paths under /app that a signed-in person without a usable trust may still open. */
const WITHOUT_TRUST = ['/app/account'];

/** The methods an app page answers; everything else is a write, which belongs to an /api route. */
const PAGE_METHODS = new Set(['GET', 'HEAD']);

/** The 405 for a write sent to an app page rather than to its API route. */
const pageWriteRefused = () => {
  const response = toErrorResponse(
    methodNotAllowed('App pages only show information; changes are sent to the /api routes their forms name.'),
  );
  response.headers.set('allow', 'GET, HEAD');
  return response;
};

/**
 * Puts the signed-in person and the trust they act in on Astro.locals, then guards the app pages:
 * anonymous visitors go to sign-in, people without a usable trust go to their account page.
 * API routes guard themselves (requireTrust / requirePermission answer 401/403 as JSON).
 */
export const onRequest = defineMiddleware(async (context, next) => {
  context.locals.user = null;
  context.locals.trust = null;
  const path = context.url.pathname;
  // The request guard found a declared body over the limit: refuse it before anything reads it.
  const limit = context.request.headers.get(BODY_TOO_LARGE_HEADER);
  if (limit) return toErrorResponse(bodyTooLarge(Number(limit)));
  // better-auth reads its own session; static assets need none.
  if (path.startsWith('/api/auth/') || path.startsWith('/_astro/')) return next();

  // returnHeaders: when better-auth extends the session it re-issues the cookie, which we pass on below.
  const { headers: sessionHeaders, response: session } = await getAuth().api.getSession({
    headers: context.request.headers,
    returnHeaders: true,
  });
  const refreshedCookies = sessionHeaders?.getSetCookie() ?? [];
  if (session) {
    const { user } = session;
    context.locals.user = { id: user.id, email: user.email, name: user.name, emailVerified: user.emailVerified };
    const usable = (await listMemberships(getDb(), user.id)).filter((m) => !m.ended);
    const activeId = session.session.activeOrganizationId ?? null;
    let active = usable.find((m) => m.trustId === activeId);
    // With a single usable trust, people land in it without choosing.
    if (!active && usable.length === 1) active = usable[0];
    if ((active?.trustId ?? null) !== activeId)
      await setSessionTrust(getDb(), session.session.id, active?.trustId ?? null);
    if (active) {
      context.locals.trust = {
        id: active.trustId,
        name: active.trustName,
        role: active.role,
        schoolIds: active.schoolIds,
      };
    }
  }

  if (path === '/app' || path.startsWith('/app/')) {
    // App pages only show things: their forms post to /api routes, which authorise, validate and audit each write.
    if (!PAGE_METHODS.has(context.request.method)) return pageWriteRefused();
    if (!context.locals.user) {
      const nextPath = `${path}${context.url.search}`;
      return context.redirect(`/sign-in?next=${encodeURIComponent(nextPath)}`, 303);
    }
    if (!context.locals.trust && !WITHOUT_TRUST.some((p) => path === p || path.startsWith(`${p}/`))) {
      return withCookies(context.redirect('/app/account?notice=no-trust', 303), refreshedCookies);
    }
  }
  // Billing: after an unpaid renewal's grace period, writes to /api answer 402 (reads and exports still work).
  const readOnly = await billingWriteGate(getDb(), context.locals, context.request);
  if (readOnly) return closeIfBodyUnread(context.request, readOnly);
  return closeIfBodyUnread(context.request, withCookies(await next(), refreshedCookies));
});

/** Closes the connection after answering a request whose unbounded body was never read (see mustCloseUnreadBody). */
function closeIfBodyUnread(request: Request, response: Response): Response {
  if (!mustCloseUnreadBody(request)) return response;
  try {
    response.headers.set('connection', 'close');
    return response;
  } catch {
    const copy = new Response(response.body, response);
    copy.headers.set('connection', 'close');
    return copy;
  }
}

/** Adds re-issued session cookies to a response (copying it when its headers are immutable). */
function withCookies(response: Response, cookies: string[]): Response {
  if (cookies.length === 0) return response;
  try {
    for (const cookie of cookies) response.headers.append('set-cookie', cookie);
    return response;
  } catch {
    const copy = new Response(response.body, response);
    for (const cookie of cookies) copy.headers.append('set-cookie', cookie);
    return copy;
  }
}
