import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { getDb } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { route } from '../../../../lib/server/http/route';
import { getRejectedRows } from '../../../../lib/server/register/import.service';
import { writeRejectedRowsXlsx } from '../../../../lib/server/register/rejected-workbook';

/** The rows an import rejected, under the file's header with a "What to fix" column: fix them and upload it again. */
export const GET = route(async ({ locals, params }) => {
  const trust = requirePermission(locals, 'register', 'import');
  const id = IdParamSchema.parse(params.id);
  const rejected = await getRejectedRows(getDb(), { trust, userId: actorOf(locals).actorUserId ?? '' }, id);
  const bytes = await writeRejectedRowsXlsx(rejected);
  return new Response(new Uint8Array(bytes), {
    headers: {
      'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      'content-disposition': `attachment; filename="rejected-rows-${id.slice(0, 8)}.xlsx"`,
      'cache-control': 'no-store',
    },
  });
});
