import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { parseQuery } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { bidPackPdf } from '../../../../lib/server/programme/bid-pack';
import { attachment } from '../../../../lib/server/programme/download';
import { programmeId } from '../../../../lib/server/programme/programme.params';
import { BidPackQuerySchema } from '../../../../lib/server/programme/programme.schemas';
import { getProgramme } from '../../../../lib/server/programme/programmes.service';

/** The funding-bid pack of one school in the programme, as PDF. */
export const GET = route(async ({ locals, params, url }) => {
  const trust = requirePermission(locals, 'programme', 'export');
  const id = programmeId(params.id);
  const { schoolId } = parseQuery(url, BidPackQuerySchema);
  const view = await getProgramme(getDb(), trust, id);
  return attachment(await bidPackPdf(view, schoolId, trust.name), 'application/pdf', `${view.name} bid pack.pdf`);
});
