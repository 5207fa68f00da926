import { actorOf } from '../../../../lib/server/audit/audit.repository';
import { requirePermission } from '../../../../lib/server/auth/guard';
import { followSchoolCount } from '../../../../lib/server/billing/billing.service';
import { getDb, getPool } from '../../../../lib/server/db/client';
import { IdParamSchema } from '../../../../lib/server/estate/estate.schemas';
import { json, parseJson } from '../../../../lib/server/http/respond';
import { route } from '../../../../lib/server/http/route';
import { commitImport } from '../../../../lib/server/register/import.service';
import { CommitBodySchema } from '../../../../lib/server/register/register.schemas';

/** Commits a previewed import's valid rows in one transaction ({ rows: "valid" }), or cancels it ({ rows: "none" }). */
export const POST = route(async ({ locals, params, request }) => {
  const trust = requirePermission(locals, 'register', 'import');
  const id = IdParamSchema.parse(params.id);
  const body = await parseJson(request, CommitBodySchema);
  const outcome = await commitImport(getPool(), trust, actorOf(locals), id, body);
  // New schools raise the paid plan's quantity (prorated); a provider hiccup is retried by the billing page.
  if (outcome.schoolsCreated > 0) await followSchoolCount(getDb(), trust.id, actorOf(locals));
  return json({ id, outcome });
});
