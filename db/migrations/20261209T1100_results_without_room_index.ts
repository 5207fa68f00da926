import { sql, type Kysely } from 'kysely';

// Frozen migration: room_results loses its index on room_id alone. Every read of results names the run (the primary
// key run_id, room_id, or run_id, school_id); the one reader by room (what removing a school takes) now goes through
// the school's runs. Each run writes one index fewer per room (a run of 100,000 rooms, 100,000 fewer entries).

export async function up(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX IF EXISTS room_results_room_all_idx`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`CREATE INDEX room_results_room_all_idx ON room_results (room_id)`.execute(db);
}
