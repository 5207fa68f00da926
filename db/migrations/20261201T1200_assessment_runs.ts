import { sql, type Kysely } from 'kysely';

// Frozen migration: assessment runs and their per-room results. Results are denormalised
// (trust, school, block, ventilation type, pupils) so the portfolio views page and sort
// 100,000 rooms without joins; `is_current` marks the latest succeeded result of each room.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('assessment_runs')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('scope', 'text', (c) => c.notNull().check(sql`scope IN ('trust', 'school')`))
    .addColumn('school_id', 'uuid', (c) => c.references('schools.id').onDelete('cascade'))
    .addColumn('status', 'text', (c) =>
      c.notNull().defaultTo('queued').check(sql`status IN ('queued', 'running', 'succeeded', 'failed')`),
    )
    .addColumn('rooms_done', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('rooms_total', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('assumption_set_id', 'text')
    .addColumn('assumptions_version', 'text')
    .addColumn('started_by_user_id', 'text')
    .addColumn('started_by_email', 'text')
    .addColumn('error', 'text')
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('started_at', 'timestamptz')
    .addColumn('finished_at', 'timestamptz')
    .addCheckConstraint('assessment_runs_school_scope', sql`(scope = 'school') = (school_id IS NOT NULL)`)
    .execute();
  await db.schema
    .createIndex('assessment_runs_trust_created_idx')
    .on('assessment_runs')
    .columns(['trust_id', 'created_at'])
    .execute();

  await db.schema
    .createTable('room_results')
    .addColumn('run_id', 'uuid', (c) => c.notNull().references('assessment_runs.id').onDelete('cascade'))
    .addColumn('room_id', 'uuid', (c) => c.notNull().references('rooms.id').onDelete('cascade'))
    .addColumn('trust_id', 'text', (c) => c.notNull())
    .addColumn('school_id', 'uuid', (c) => c.notNull())
    .addColumn('block_id', 'uuid')
    .addColumn('ventilation_type', 'text', (c) => c.notNull())
    .addColumn('pupils', 'integer', (c) => c.notNull())
    .addColumn('is_current', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('worst_season', 'text', (c) => c.notNull())
    .addColumn('mean_co2_ppm', 'double precision', (c) => c.notNull())
    .addColumn('peak_co2_ppm', 'double precision', (c) => c.notNull())
    .addColumn('criteria_met', 'boolean', (c) => c.notNull())
    .addColumn('risk_band', 'smallint', (c) => c.notNull())
    .addColumn('risk_score', 'double precision', (c) => c.notNull())
    .addColumn('pupil_hours_above', 'double precision', (c) => c.notNull())
    .addColumn('reason', 'text', (c) => c.notNull())
    .addColumn('units_recommended', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('unit_count', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('capital_cost_gbp', 'double precision')
    .addColumn('annual_saving_gbp', 'double precision')
    .addColumn('annual_saving_kwh', 'double precision')
    .addColumn('annual_saving_kgco2e', 'double precision')
    .addColumn('simple_payback_years', 'double precision')
    .addColumn('discounted_payback_years', 'double precision')
    .addColumn('npv_gbp', 'double precision')
    .addColumn('pupil_hours_removed_per_1000_gbp', 'double precision')
    .addColumn('capital_per_tonne_co2e_gbp', 'double precision')
    // Component scores in 0–1 (higher = do sooner), combined with the trust's weights at query time.
    .addColumn('score_risk', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('score_cost_effectiveness', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('score_payback', 'double precision', (c) => c.notNull().defaultTo(0))
    .addColumn('rank', 'integer')
    .addColumn('detail', 'jsonb', (c) => c.notNull())
    .addPrimaryKeyConstraint('room_results_pk', ['run_id', 'room_id'])
    .execute();
  await sql`CREATE INDEX room_results_current_rank_idx ON room_results (trust_id, rank) WHERE is_current`.execute(db);
  await sql`CREATE INDEX room_results_current_school_idx ON room_results (trust_id, school_id, rank) WHERE is_current`.execute(
    db,
  );
  await sql`CREATE INDEX room_results_current_payback_idx ON room_results (trust_id, simple_payback_years) WHERE is_current`.execute(
    db,
  );
  await sql`CREATE INDEX room_results_room_idx ON room_results (room_id) WHERE is_current`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('room_results').execute();
  await db.schema.dropTable('assessment_runs').execute();
}
