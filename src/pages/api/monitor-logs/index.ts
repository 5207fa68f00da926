import { Readable } from 'node:stream';
import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb, getPool } from '../../../lib/server/db/client';
import { json, parseQuery } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { previewLog } from '../../../lib/server/monitor-logs/import.service';
import { listLogs } from '../../../lib/server/monitor-logs/logs.repository';
import { bodyMissing } from '../../../lib/server/monitor-logs/monitor-logs.errors';
import { UploadQuerySchema } from '../../../lib/server/monitor-logs/monitor-logs.schemas';

/** The trust's monitor logs the member may see, newest first. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'monitoring', 'read');
  return json({ logs: await listLogs(getDb(), trust, locals.user?.id ?? null) });
});

/** Uploads a log (the request body is the file itself, streamed) and answers its preview; nothing counts until commit. */
export const POST = route(async ({ locals, request, url }) => {
  const trust = requirePermission(locals, 'monitoring', 'import');
  const query = parseQuery(url, UploadQuerySchema);
  if (!request.body) throw bodyMissing();
  const preview = await previewLog(
    getPool(),
    trust,
    actorOf(locals),
    { fileName: query.fileName, stream: Readable.fromWeb(request.body as import('node:stream/web').ReadableStream) },
    { timeBasis: query.timeBasis === 'auto' ? null : query.timeBasis, schoolId: query.schoolId ?? null },
  );
  return json(preview, 201);
});
