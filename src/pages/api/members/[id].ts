import { z } from 'zod';
import { MemberUpdateSchema } from '../../../lib/server/auth/auth.schemas';
import { requirePermission } from '../../../lib/server/auth/guard';
import { removeMember, updateMember } from '../../../lib/server/auth/members.service';
import { getDb } from '../../../lib/server/db/client';
import { unauthenticated } from '../../../lib/server/http/errors';
import { field, fieldList, formDone, formMethods, isFormPost, parseBody } from '../../../lib/server/http/forms';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

const MemberIdSchema = z.string().trim().min(1).max(200);

/** Changes a member's role, school limits or end date. */
export const PATCH = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'members', 'update');
  if (!locals.user) throw unauthenticated();
  const change = await parseBody(request, MemberUpdateSchema, (f) => ({
    role: field(f, 'role'),
    schoolIds: field(f, 'limitSchools') === 'chosen' ? fieldList(f, 'schoolIds') : null,
    accessEndsOn: field(f, 'accessEndsOn') || null,
  }));
  const member = await updateMember(
    getDb(),
    { user: locals.user, trust, headers: request.headers },
    MemberIdSchema.parse(params.id),
    change,
  );
  return isFormPost(request) ? formDone(request, 'Saved.') : json({ member });
});

/** Removes a member from the trust. */
export const DELETE = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'members', 'remove');
  if (!locals.user) throw unauthenticated();
  await removeMember(getDb(), { user: locals.user, trust, headers: request.headers }, MemberIdSchema.parse(params.id));
  return isFormPost(request) ? formDone(request, 'Member removed.') : new Response(null, { status: 204 });
});

/** The members page's forms: `_method` PATCH or DELETE. */
export const POST = formMethods({ PATCH, DELETE });
