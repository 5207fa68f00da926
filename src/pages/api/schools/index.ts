import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { listSchools } from '../../../lib/server/estate/estate.repository';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';

/** The trust's schools with block, room and pupil counts. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  return json({ schools: await listSchools(getDb(), trust) });
});
