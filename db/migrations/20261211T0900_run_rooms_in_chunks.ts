import { sql, type Kysely } from 'kysely';

// Frozen migration: a run's snapshot of rooms moves into its chunks. Each chunk keeps its rooms' ids as one array
// (room_ids, in id order) instead of one assessment_run_rooms row per room with its primary-key entry: starting a run
// of 100,000 rooms wrote 100,000 rows and index entries (and then numbered them again to cut the chunks) before any
// worker could begin; it now writes one row per chunk of 2,000. Existing runs keep their snapshots.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE assessment_run_chunks ADD COLUMN room_ids uuid[]`.execute(db);
  await sql`
    UPDATE assessment_run_chunks c SET room_ids = (
      SELECT coalesce(array_agg(arr.room_id ORDER BY arr.room_id), '{}') FROM assessment_run_rooms arr
      WHERE arr.run_id = c.run_id AND arr.room_id <= c.last_room_id
        AND (c.after_room_id IS NULL OR arr.room_id > c.after_room_id))`.execute(db);
  await sql`ALTER TABLE assessment_run_chunks ALTER COLUMN room_ids SET NOT NULL`.execute(db);
  // A deleted run's chunks go by their foreign key; its results still by this trigger.
  await sql`CREATE OR REPLACE FUNCTION room_results_of_deleted_runs() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM room_results rr USING deleted_runs d WHERE rr.run_id = d.id;
      RETURN NULL;
    END $$`.execute(db);
  await sql`DROP TABLE assessment_run_rooms`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE assessment_run_rooms (run_id uuid NOT NULL, room_id uuid NOT NULL,
    CONSTRAINT assessment_run_rooms_pk PRIMARY KEY (run_id, room_id))`.execute(db);
  await sql`INSERT INTO assessment_run_rooms (run_id, room_id)
    SELECT c.run_id, unnest(c.room_ids) FROM assessment_run_chunks c`.execute(db);
  await sql`CREATE OR REPLACE FUNCTION room_results_of_deleted_runs() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM room_results rr USING deleted_runs d WHERE rr.run_id = d.id;
      DELETE FROM assessment_run_rooms arr USING deleted_runs d WHERE arr.run_id = d.id;
      RETURN NULL;
    END $$`.execute(db);
  await sql`ALTER TABLE assessment_run_chunks DROP COLUMN room_ids`.execute(db);
}
