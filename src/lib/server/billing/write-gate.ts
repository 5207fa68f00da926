import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { AppError, toErrorResponse } from '../http/errors';
import { getBillingAccount } from './billing.repository';
import { billingStanding } from './standing';

/** Throws a 402 when the trust is read-only after an unpaid renewal's grace period; reads never call this. */
export async function assertWritable(db: Kysely<Database>, trustId: string): Promise<void> {
  const standing = billingStanding(await getBillingAccount(db, trustId));
  if (standing.mode !== 'read_only') return;
  throw new AppError(
    402,
    'read_only',
    'Airtally is read-only for this trust because the subscription payment has not gone through. You can still read and export everything; nothing has been deleted. A trust admin can pay under Settings → Billing, and changes work again as soon as the payment succeeds.',
    { graceEndedAt: standing.graceEndsAt?.toISOString() ?? null },
  );
}

const READ_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
/** API paths that stay open in read-only mode: sign-in and account, billing itself, exports and what-if previews (which store nothing). */
const ALWAYS_OPEN = [
  /^\/api\/auth\//,
  /^\/api\/account\//,
  /^\/api\/billing(\/|$)/,
  /^\/api\/exports?\//,
  /\/export(\/|$)/,
  /\/what-if$/,
];
/** App pages whose forms stay open: the person's own account and the billing page (to pay). */
const PAGES_OPEN = [/^\/app\/account(\/|$)/, /^\/app\/settings\/billing$/];

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/** The 402 for a page form: a plain page saying what happened and where to go. */
function readOnlyPage(message: string, back: string): Response {
  const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Read-only</title></head><body style="font-family:sans-serif;max-width:40rem;margin:3rem auto;padding:0 1rem">
<h1>Read-only for now</h1><p>${escapeHtml(message)}</p><p><a href="${escapeHtml(back)}">Go back</a> · <a href="/app/settings/billing">Billing</a></p></body></html>`;
  return new Response(html, { status: 402, headers: { 'content-type': 'text/html; charset=utf-8' } });
}

/**
 * The read-only gate for the middleware: for a write (any method but GET/HEAD/OPTIONS) to /api/* or
 * to an /app page's form by a member of a read-only trust, the 402 response to send; otherwise null.
 * Reads, exports, sign-in, the account and billing always pass.
 */
export async function billingWriteGate(
  db: Kysely<Database>,
  locals: App.Locals,
  request: Request,
): Promise<Response | null> {
  if (READ_METHODS.has(request.method) || !locals.trust) return null;
  const path = new URL(request.url).pathname;
  const api = path.startsWith('/api/');
  const page = path === '/app' || path.startsWith('/app/');
  if (api && ALWAYS_OPEN.some((p) => p.test(path))) return null;
  if (page && PAGES_OPEN.some((p) => p.test(path))) return null;
  if (!api && !page) return null;
  try {
    await assertWritable(db, locals.trust.id);
    return null;
  } catch (error) {
    if (api || !(error instanceof AppError)) return toErrorResponse(error);
    return readOnlyPage(error.message, path);
  }
}
