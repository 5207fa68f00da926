import { sql, type Kysely } from 'kysely';

// Frozen migration: portfolio_ranks carries each room's filter and sort keys (copied from room_results
// when the ranks are rebuilt), so the priorities list filters, sorts, counts and pages on one narrow
// table at 100,000 rooms, and joins the wide result rows only for the page it returns.

const COLUMNS: [string, string][] = [
  ['block_id', 'uuid'],
  ['school_name', 'text'],
  ['ventilation_type', 'text'],
  ['risk_band', 'smallint'],
  ['criteria_met', 'boolean'],
  ['pupils', 'integer'],
  ['mean_co2_ppm', 'double precision'],
  ['peak_co2_ppm', 'double precision'],
  ['unit_count', 'integer'],
  ['capital_cost_gbp', 'double precision'],
  ['simple_payback_years', 'double precision'],
  ['npv_gbp', 'double precision'],
  ['pupil_hours_above', 'double precision'],
  ['score_risk', 'double precision'],
  ['score_cost_effectiveness', 'double precision'],
  ['score_payback', 'double precision'],
];

export async function up(db: Kysely<any>): Promise<void> {
  // Ranks are derived data: clear them so the next read rebuilds them with the new columns filled.
  await sql`DELETE FROM portfolio_ranks`.execute(db);
  await sql`UPDATE portfolio_settings SET ranked_weights = NULL, ranked_stamp = NULL`.execute(db);
  for (const [name, type] of COLUMNS)
    await db.schema.alterTable('portfolio_ranks').addColumn(name, sql.raw(type)).execute();
  await sql`CREATE INDEX portfolio_ranks_payback_idx ON portfolio_ranks (trust_id, simple_payback_years, rank)`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX portfolio_ranks_payback_idx`.execute(db);
  for (const [name] of COLUMNS) await db.schema.alterTable('portfolio_ranks').dropColumn(name).execute();
}
