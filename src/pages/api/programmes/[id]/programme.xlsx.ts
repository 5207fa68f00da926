import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { route } from '../../../../lib/server/http/route';
import { programmeId } from '../../../../lib/server/programme/programme.params';
import { programmeWorkbook } from '../../../../lib/server/programme/programme-xlsx';
import { getProgramme } from '../../../../lib/server/programme/programmes.service';
import { attachment } from '../../../../lib/server/programme/download';

/** The programme as .xlsx: summary, one sheet per year, rooms left out, assumptions and cautions. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'programme', 'export');
  const view = await getProgramme(getDb(), trust, programmeId(params.id));
  return attachment(
    await programmeWorkbook(view),
    'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    `${view.name}.xlsx`,
  );
});
