import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission, requireWholeTrust } from '../../../lib/server/auth/guard';
import { followSchoolCount } from '../../../lib/server/billing/billing.service';
import { getDb } from '../../../lib/server/db/client';
import { listSchools } from '../../../lib/server/estate/schools.repository';
import { SchoolCreateSchema } from '../../../lib/server/estate/estate.schemas';
import { createSchool } from '../../../lib/server/estate/schools.service';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's schools with block, room and pupil counts. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  return json({ schools: await listSchools(getDb(), trust) });
});

/** Adds a school (402 beyond the free plan); on the paid plan the subscription quantity follows, prorated. */
export const POST = route(async ({ locals, request }) => {
  const trust = requireWholeTrust(requirePermission(locals, 'register', 'create'), 'add a school');
  const input = await parseJson(request, SchoolCreateSchema);
  const school = await createSchool(getDb(), trust, actorOf(locals), input);
  await followSchoolCount(getDb(), trust.id, actorOf(locals));
  return json({ school }, 201);
});
