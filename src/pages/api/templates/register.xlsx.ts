import { Readable } from 'node:stream';
import { requirePermission } from '../../../lib/server/auth/guard';
import { route } from '../../../lib/server/http/route';
import { writeRegisterXlsx } from '../../../lib/server/register/workbook';

/** The empty register template: Rooms sheet with drop-downs and number formats, and a Guide sheet. */
export const GET = route(async ({ locals }) => {
  requirePermission(locals, 'estate', 'read');
  const stream = Readable.toWeb(writeRegisterXlsx([])) as ReadableStream<Uint8Array>;
  return new Response(stream, {
    headers: {
      'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      'content-disposition': 'attachment; filename="airtally-room-register-template.xlsx"',
    },
  });
});
