import { sql, type Kysely } from 'kysely';

// Frozen migration: a trust admin's request to pay by invoice against a purchase order. Each request is kept (the
// newest is the trust's standing); ops arranges invoice payment with the payment provider by hand.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('invoice_payment_requests')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('purchase_order', 'text', (c) => c.notNull())
    .addColumn('billing_email', 'text', (c) => c.notNull())
    .addColumn('note', 'text')
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('requested'))
    .addColumn('requested_by_user_id', 'text', (c) => c.references('user.id').onDelete('set null'))
    .addColumn('requested_by_email', 'text', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint(
      'invoice_payment_requests_purchase_order_length',
      sql`char_length(purchase_order) BETWEEN 1 AND 60`,
    )
    .addCheckConstraint('invoice_payment_requests_note_length', sql`note IS NULL OR char_length(note) <= 500`)
    .addCheckConstraint('invoice_payment_requests_status_known', sql`status IN ('requested', 'arranged', 'declined')`)
    .execute();
  await db.schema
    .createIndex('invoice_payment_requests_trust_created')
    .on('invoice_payment_requests')
    .columns(['trust_id', 'created_at'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('invoice_payment_requests').execute();
}
