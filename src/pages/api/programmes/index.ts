import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { json, parseJson } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { CreateProgrammeSchema } from '../../../lib/server/programme/programme.schemas';
import { createProgramme, getProgramme, listProgrammes } from '../../../lib/server/programme/programmes.service';

/** The trust's capital programmes (saved scenarios) with their headline figures. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'programme', 'read');
  return json({ programmes: await listProgrammes(getDb(), trust) });
});

/** Creates and plans a programme from the latest assessment results (audited). */
export const POST = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'programme', 'edit');
  const input = await parseJson(request, CreateProgrammeSchema);
  const { id } = await createProgramme(getDb(), trust, actorOf(locals), input);
  return json({ programme: await getProgramme(getDb(), trust, id) }, 201);
});
