import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../../../../db/database';

/** One audited write: who did what to which record, with optional before/after snapshots. */
export interface AuditEntry {
  trustId: string | null;
  actorUserId: string | null;
  actorEmail: string | null;
  action: string;
  entityType: string;
  entityId: string | null;
  summary: string;
  before?: unknown;
  after?: unknown;
}

/** Writes audit entries; call it inside the same transaction as the write it describes. */
export async function recordAudit(
  db: Kysely<Database> | Transaction<Database>,
  entries: AuditEntry | AuditEntry[],
): Promise<void> {
  const list = Array.isArray(entries) ? entries : [entries];
  if (list.length === 0) return;
  await db
    .insertInto('audit_events')
    .values(
      list.map((e) => ({
        trust_id: e.trustId,
        actor_user_id: e.actorUserId,
        actor_email: e.actorEmail,
        action: e.action,
        entity_type: e.entityType,
        entity_id: e.entityId,
        summary: e.summary,
        before: e.before === undefined ? null : JSON.stringify(e.before),
        after: e.after === undefined ? null : JSON.stringify(e.after),
      })),
    )
    .execute();
}

/** The actor fields of an audit entry, from the request's locals. */
export function actorOf(locals: App.Locals): Pick<AuditEntry, 'actorUserId' | 'actorEmail' | 'trustId'> {
  return {
    actorUserId: locals.user?.id ?? null,
    actorEmail: locals.user?.email ?? null,
    trustId: locals.trust?.id ?? null,
  };
}
