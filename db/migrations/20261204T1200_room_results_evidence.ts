import { sql, type Kysely } from 'kysely';

// Frozen migration: which evidence a room result's risk rests on: measured readings, the calibrated model,
// or the model's prediction alone.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE room_results ADD COLUMN risk_evidence text NOT NULL DEFAULT 'predicted'
    CONSTRAINT room_results_risk_evidence_known CHECK (risk_evidence IN ('measured', 'calibrated', 'predicted'))`.execute(
    db,
  );
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('room_results').dropColumn('risk_evidence').execute();
}
