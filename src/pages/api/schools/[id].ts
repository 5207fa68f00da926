import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission, requireWholeTrust } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { getSchool } from '../../../lib/server/estate/schools.repository';
import { IdParamSchema } from '../../../lib/server/estate/estate.schemas';
import { notFound } from '../../../lib/server/http/errors';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { SchoolPatchSchema } from '../../../lib/server/estate/estate.schemas';
import { deleteSchool, updateSchool } from '../../../lib/server/estate/schools.service';
import { followSchoolCount } from '../../../lib/server/billing/billing.service';

/** One school with its blocks. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  const id = IdParamSchema.parse(params.id);
  const school = await getSchool(getDb(), trust, id);
  if (!school) throw notFound('That school');
  return json({ school });
});

/** Changes a school's attributes. */
export const PATCH = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'register', 'update');
  const id = IdParamSchema.parse(params.id);
  const patch = await parseJson(request, SchoolPatchSchema);
  await updateSchool(getDb(), trust, actorOf(locals), id, patch);
  return json({ school: await getSchool(getDb(), trust, id) });
});

/** Removes a school with its blocks, rooms and results (GET ./removal says what goes first). */
export const DELETE = route(async ({ locals, params }) => {
  const trust = requireWholeTrust(requirePermission(locals, 'register', 'delete'), 'remove a school');
  const id = IdParamSchema.parse(params.id);
  const removed = await deleteSchool(getDb(), trust, actorOf(locals), id);
  // Billing hook: one school fewer changes a paid plan's quantity. Telling the person about the change before it is
  // made is billing's own item; here the subscription follows the count, as it does after adding a school.
  await followSchoolCount(getDb(), trust.id, actorOf(locals));
  return json({ removed });
});
