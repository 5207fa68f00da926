import { sql, type Kysely } from 'kysely';

// Frozen migration: each trust's plan and subscription as last read from the payment provider,
// and every provider event stored once (its id is the primary key, so a replay inserts nothing).

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('billing_accounts')
    .addColumn('trust_id', 'text', (c) => c.primaryKey().references('trusts.id').onDelete('cascade'))
    .addColumn('plan', 'text', (c) => c.notNull().defaultTo('free'))
    .addColumn('billing_interval', 'text')
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('none'))
    .addColumn('provider_customer_id', 'text', (c) => c.unique())
    .addColumn('provider_subscription_id', 'text', (c) => c.unique())
    .addColumn('quantity', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('current_period_end', 'timestamptz')
    .addColumn('trial_end', 'timestamptz')
    .addColumn('cancel_at_period_end', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('payment_failed_at', 'timestamptz')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('billing_accounts_plan_known', sql`plan IN ('free', 'per_school')`)
    .addCheckConstraint(
      'billing_accounts_interval_known',
      sql`billing_interval IS NULL OR billing_interval IN ('month', 'year')`,
    )
    .addCheckConstraint('billing_accounts_quantity_not_negative', sql`quantity >= 0`)
    .execute();
  await sql`CREATE TRIGGER billing_accounts_updated_at BEFORE UPDATE ON billing_accounts
    FOR EACH ROW EXECUTE FUNCTION set_updated_at()`.execute(db);

  await db.schema
    .createTable('payment_events')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('type', 'text', (c) => c.notNull())
    .addColumn('trust_id', 'text', (c) => c.references('trusts.id').onDelete('set null'))
    .addColumn('object_id', 'text')
    .addColumn('provider_created_at', 'timestamptz', (c) => c.notNull())
    .addColumn('received_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('payload', 'jsonb', (c) => c.notNull())
    .execute();
  await db.schema
    .createIndex('payment_events_trust_idx')
    .on('payment_events')
    .columns(['trust_id', 'received_at'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('payment_events').execute();
  await db.schema.dropTable('billing_accounts').execute();
}
