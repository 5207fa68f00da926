import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { json } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { programmeId } from '../../../../lib/server/programme/programme.params';
import { getProgramme, refreshProgramme } from '../../../../lib/server/programme/programmes.service';

/** Reads the latest assessment results into the programme and re-plans it (audited). */
export const POST = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'programme', 'edit');
  const id = programmeId(params.id);
  await refreshProgramme(getDb(), trust, actorOf(locals), id);
  return json({ programme: await getProgramme(getDb(), trust, id) });
});
