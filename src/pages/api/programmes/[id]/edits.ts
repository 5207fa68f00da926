import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { json, parseJson } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { programmeId } from '../../../../lib/server/programme/programme.params';
import { ProgrammeEditSchema } from '../../../../lib/server/programme/programme.schemas';
import { editProgramme, getProgramme } from '../../../../lib/server/programme/programmes.service';

/** A change by hand (pin a room to a year, unpin, force in, keep out, release): re-planned, checked and audited. */
export const POST = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'programme', 'edit');
  const id = programmeId(params.id);
  const edit = await parseJson(request, ProgrammeEditSchema);
  const impact = await editProgramme(getDb(), trust, actorOf(locals), id, edit);
  return json({ impact, programme: await getProgramme(getDb(), trust, id) });
});
