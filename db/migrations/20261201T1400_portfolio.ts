import { sql, type Kysely } from 'kysely';

// Frozen migration: the portfolio feature's saved ranking weights and the ranks they produce.
// `portfolio_ranks` holds each current room's place in the trust under the trust's weights, so the
// priorities list can page in rank order through an index instead of ranking 100,000 rooms per request.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('portfolio_settings')
    .addColumn('trust_id', 'text', (c) => c.primaryKey().references('trusts.id').onDelete('cascade'))
    // Saved weights; null until someone saves them (the engine's defaults apply).
    .addColumn('weight_risk', 'double precision')
    .addColumn('weight_cost_effectiveness', 'double precision')
    .addColumn('weight_payback', 'double precision')
    .addColumn('weights_saved_at', 'timestamptz')
    .addColumn('weights_saved_by_email', 'text')
    // What portfolio_ranks was last built from: the weights and a stamp of the trust's succeeded runs.
    .addColumn('ranked_weights', 'jsonb')
    .addColumn('ranked_stamp', 'text')
    .addColumn('ranked_at', 'timestamptz')
    .addCheckConstraint(
      'portfolio_settings_weights_range',
      sql`(weight_risk IS NULL AND weight_cost_effectiveness IS NULL AND weight_payback IS NULL) OR
          (weight_risk BETWEEN 0 AND 1 AND weight_cost_effectiveness BETWEEN 0 AND 1 AND weight_payback BETWEEN 0 AND 1
           AND weight_risk + weight_cost_effectiveness + weight_payback > 0)`,
    )
    .execute();

  await db.schema
    .createTable('portfolio_ranks')
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('room_id', 'uuid', (c) => c.notNull().references('rooms.id').onDelete('cascade'))
    .addColumn('school_id', 'uuid', (c) => c.notNull())
    .addColumn('rank', 'integer', (c) => c.notNull())
    .addColumn('score', 'double precision', (c) => c.notNull())
    .addPrimaryKeyConstraint('portfolio_ranks_pk', ['trust_id', 'room_id'])
    .execute();
  await sql`CREATE UNIQUE INDEX portfolio_ranks_rank_idx ON portfolio_ranks (trust_id, rank)`.execute(db);
  await sql`CREATE INDEX portfolio_ranks_school_rank_idx ON portfolio_ranks (trust_id, school_id, rank)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('portfolio_ranks').execute();
  await db.schema.dropTable('portfolio_settings').execute();
}
