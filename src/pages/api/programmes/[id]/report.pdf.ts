import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { route } from '../../../../lib/server/http/route';
import { boardReportPdf } from '../../../../lib/server/programme/board-report';
import { attachment } from '../../../../lib/server/programme/download';
import { programmeId } from '../../../../lib/server/programme/programme.params';
import { getProgramme } from '../../../../lib/server/programme/programmes.service';

/** The board report: a printable, paginated PDF of the programme. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'programme', 'export');
  const view = await getProgramme(getDb(), trust, programmeId(params.id));
  return attachment(await boardReportPdf(view, trust.name), 'application/pdf', `${view.name} board report.pdf`);
});
