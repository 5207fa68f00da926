import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { json, parseJson } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { programmeId } from '../../../../lib/server/programme/programme.params';
import { UpdateProgrammeSchema } from '../../../../lib/server/programme/programme.schemas';
import { deleteProgramme, getProgramme, updateProgramme } from '../../../../lib/server/programme/programmes.service';

/** One programme: settings, plan year by year, window by window, school by school, and how it was found. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'programme', 'read');
  return json({ programme: await getProgramme(getDb(), trust, programmeId(params.id)) });
});

/** Renames a programme or re-plans it with new settings (audited). */
export const PUT = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'programme', 'edit');
  const id = programmeId(params.id);
  const input = await parseJson(request, UpdateProgrammeSchema);
  await updateProgramme(getDb(), trust, actorOf(locals), id, input);
  return json({ programme: await getProgramme(getDb(), trust, id) });
});

/** Deletes a programme (audited). */
export const DELETE = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'programme', 'edit');
  await deleteProgramme(getDb(), trust, actorOf(locals), programmeId(params.id));
  return new Response(null, { status: 204 });
});
