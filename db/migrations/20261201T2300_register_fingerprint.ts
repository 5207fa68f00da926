import type { Kysely } from 'kysely';

// Frozen migration: a preview records a fingerprint of the estate it was compared with; the
// commit applies the stored plan only when the estate still has that fingerprint.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('register_imports').addColumn('estate_fingerprint', 'text').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('register_imports').dropColumn('estate_fingerprint').execute();
}
