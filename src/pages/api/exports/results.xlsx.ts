import { Readable } from 'node:stream';
import { requirePermission } from '../../../lib/server/auth/guard';
import { exportResults } from '../../../lib/server/assessments/results-export';
import { getDb } from '../../../lib/server/db/client';
import { route } from '../../../lib/server/http/route';

/** The latest current results of the trust as .xlsx (Results and Notes sheets), streamed. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'assessment', 'export');
  const body = Readable.toWeb(exportResults(getDb(), trust)) as ReadableStream<Uint8Array>;
  return new Response(body, {
    headers: {
      'content-type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      'content-disposition': `attachment; filename="airtally-results-${new Date().toISOString().slice(0, 10)}.xlsx"`,
    },
  });
});
