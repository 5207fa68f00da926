import { listMemberships } from '../../../lib/server/auth/membership.repository';
import { unauthenticated } from '../../../lib/server/http/errors';
import { getDb } from '../../../lib/server/db/client';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The signed-in person, the trust they act in, and every trust they belong to. */
export const GET = route(async ({ locals }) => {
  if (!locals.user) throw unauthenticated();
  const memberships = await listMemberships(getDb(), locals.user.id);
  return json({
    user: locals.user,
    trust: locals.trust,
    memberships: memberships.map((m) => ({
      trustId: m.trustId,
      trustName: m.trustName,
      role: m.role,
      accessEndsOn: m.accessEndsOn,
      ended: m.ended,
    })),
  });
});
