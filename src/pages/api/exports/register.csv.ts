import { Readable } from 'node:stream';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { route } from '../../../lib/server/http/route';
import { listRegisterRecords } from '../../../lib/server/register/export';
import { registerCsvLines } from '../../../lib/server/register/workbook';

/** The trust's register as CSV (UTF-8 with BOM so spreadsheet programs read accents), same columns as the template. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'register', 'export');
  const records = await listRegisterRecords(getDb(), trust);
  const lines = (function* () {
    yield Buffer.from('\ufeff');
    for (const line of registerCsvLines(records)) yield Buffer.from(line);
  })();
  const stream = Readable.toWeb(Readable.from(lines)) as ReadableStream<Uint8Array>;
  return new Response(stream, {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="room-register-${new Date().toISOString().slice(0, 10)}.csv"`,
      'cache-control': 'no-store',
    },
  });
});
