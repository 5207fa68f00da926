import type { Kysely } from 'kysely';

// Frozen migration: the trust's checkout page still open at the provider, so starting checkout again
// can close it first and a trust never has two payable checkout pages (two subscriptions).

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('billing_accounts').addColumn('open_checkout_session_id', 'text').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('billing_accounts').dropColumn('open_checkout_session_id').execute();
}
