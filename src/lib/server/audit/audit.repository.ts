import { type Kysely, sql } from 'kysely';
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

/** Entries sent per statement: an import that deletes 100,000 rooms audits each in a few round trips. */
const AUDIT_CHUNK = 5000;

/**
 * Writes audit entries; call it inside the same transaction as the write it describes. Entries travel as column
 * arrays (unnest), so many cost a few statements and never meet PostgreSQL's limit on parameters.
 */
export async function recordAudit(db: Kysely<Database>, entries: AuditEntry | readonly AuditEntry[]): Promise<void> {
  const list: readonly AuditEntry[] = Array.isArray(entries) ? entries : [entries as AuditEntry];
  const json = (v: unknown) => (v === undefined ? null : JSON.stringify(v));
  for (let start = 0; start < list.length; start += AUDIT_CHUNK) {
    const chunk = list.slice(start, start + AUDIT_CHUNK);
    const col = <T>(f: (e: AuditEntry) => T) => chunk.map(f);
    await sql`INSERT INTO audit_events (trust_id, actor_user_id, actor_email, action, entity_type, entity_id, summary, before, after)
      SELECT t, u, e, a, et, ei, s, b::jsonb, af::jsonb FROM unnest(
        ${col((e) => e.trustId)}::text[], ${col((e) => e.actorUserId)}::text[], ${col((e) => e.actorEmail)}::text[],
        ${col((e) => e.action)}::text[], ${col((e) => e.entityType)}::text[], ${col((e) => e.entityId)}::text[],
        ${col((e) => e.summary)}::text[], ${col((e) => json(e.before))}::text[], ${col((e) => json(e.after))}::text[]
      ) AS x(t, u, e, a, et, ei, s, b, af)`.execute(db);
  }
}

/** The actor fields of an audit entry, from the request's locals. */
export function actorOf(locals: App.Locals): Pick<AuditEntry, 'actorUserId' | 'actorEmail' | 'trustId'> {
  return {
    actorUserId: locals.user?.id ?? null,
    actorEmail: locals.user?.email ?? null,
    trustId: locals.trust?.id ?? null,
  };
}
