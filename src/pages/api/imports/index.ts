import { actorOf } from '../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../lib/server/auth/guard';
import { getDb } from '../../../lib/server/db/client';
import { AppError } from '../../../lib/server/http/errors';
import { json } from '../../../lib/server/http/respond';
import { route } from '../../../lib/server/http/route';
import { listImports, previewImport } from '../../../lib/server/register/import.service';
import { fileMissing } from '../../../lib/server/register/register.errors';
import { ImportOptionsSchema } from '../../../lib/server/register/register.schemas';

/** The trust's import history, newest first. */
export const GET = route(async ({ locals }) => {
  const trust = requirePermission(locals, 'estate', 'read');
  return json({ imports: await listImports(getDb(), { trust, userId: actorOf(locals).actorUserId ?? '' }) });
});

/** Uploads a register (multipart, field `file`) and answers its preview; nothing is written to the estate yet. */
export const POST = route(async ({ locals, request }) => {
  const trust = requirePermission(locals, 'register', 'import');
  // The request guard has limited the body to the upload size (413 beyond it, before or while reading).
  const form = await request.formData().catch((error: unknown) => {
    if (error instanceof AppError) throw error;
    return null;
  });
  const file = form?.get('file');
  if (!form || !file || typeof file === 'string') throw fileMissing();
  const options = ImportOptionsSchema.parse({
    headerRow: form.get('headerRow') ?? undefined,
    mapping: form.get('mapping') ?? undefined,
    clearBlanks: form.get('clearBlanks') ?? undefined,
    schools: form.get('schools') ?? undefined,
  });
  const bytes = Buffer.from(await file.arrayBuffer());
  const preview = await previewImport(
    getDb(),
    trust,
    actorOf(locals),
    { fileName: file.name || 'register', bytes },
    options,
  );
  return json(preview, 201);
});
