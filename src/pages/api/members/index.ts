import { InviteSchema } from '../../../lib/server/auth/auth.schemas';
import { requirePermission, requireVerifiedEmail } from '../../../lib/server/auth/guard';
import { inviteMember, listMembers, membersAsSeenBy } from '../../../lib/server/auth/members.service';
import { getDb } from '../../../lib/server/db/client';
import { field, fieldList, formDone, isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's members and pending invitations. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'members', 'read');
  return json(membersAsSeenBy(await listMembers(getDb(), trust), trust));
});

/** Invites someone by e-mail with a role (the inviter's address must be confirmed). */
export const POST = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'members', 'invite');
  const user = requireVerifiedEmail(locals);
  const input = await parseBody(request, InviteSchema, (f) => ({
    email: field(f, 'email'),
    role: field(f, 'role'),
    schoolIds: fieldList(f, 'schoolIds').length ? fieldList(f, 'schoolIds') : null,
    accessEndsOn: field(f, 'accessEndsOn') || null,
  }));
  const invitation = await inviteMember(getDb(), { user, trust, headers: request.headers }, input);
  return isFormPost(request) ? formDone(request, `Invitation sent to ${input.email}.`) : json({ invitation }, 201);
});
