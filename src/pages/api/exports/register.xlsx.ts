import { Readable } from 'node:stream';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { route } from '../../../lib/server/http/route';
import { listRegisterRecords } from '../../../lib/server/register/export';
import { writeRegisterXlsx } from '../../../lib/server/register/workbook';

/** The trust's register as an .xlsx in the template's format (export → import changes nothing). */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'register', 'export');
  const records = await listRegisterRecords(getDb(), trust);
  const stream = Readable.toWeb(writeRegisterXlsx(records)) as ReadableStream<Uint8Array>;
  return new Response(stream, {
    headers: {
      'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      'content-disposition': `attachment; filename="room-register-${new Date().toISOString().slice(0, 10)}.xlsx"`,
      'cache-control': 'no-store',
    },
  });
});
