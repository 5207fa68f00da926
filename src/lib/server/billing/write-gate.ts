import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { AppError, toErrorResponse } from '../http/errors';
import { formRefused, isFormPost } from '../http/forms';
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

/**
 * The read-only gate for the middleware: for a write (any method but GET/HEAD/OPTIONS) to /api/* by a member of a
 * read-only trust, the 402 to send (a page's form is sent back to its page with the reason); otherwise null.
 * Reads, exports, sign-in, the account and billing always pass. Pages write only through /api (forms.ts).
 */
export async function billingWriteGate(
  db: Kysely<Database>,
  locals: App.Locals,
  request: Request,
): Promise<Response | null> {
  if (READ_METHODS.has(request.method) || !locals.trust) return null;
  const path = new URL(request.url).pathname;
  if (!path.startsWith('/api/') || ALWAYS_OPEN.some((p) => p.test(path))) return null;
  try {
    await assertWritable(db, locals.trust.id);
    return null;
  } catch (error) {
    return isFormPost(request) ? formRefused(request, error) : toErrorResponse(error);
  }
}
