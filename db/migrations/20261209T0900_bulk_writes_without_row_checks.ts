import { sql, type Kysely } from 'kysely';

// Frozen migration: a run writes its room snapshot and the trust's ranks without a foreign-key check per row.
// Each of those checks is a lookup per row written (about 0.3 s per 100,000 rooms each); what they did on delete is
// done by statement-level triggers instead, one statement for all the rows a delete touches:
//  - a deleted run takes its snapshot rooms with it (as it already takes its results);
//  - a deleted room, school or trust takes its ranks with it; after a room or school the trust is ranked again on the
//    next read, so the ranks run 1…n without a gap (before, the list kept a gap and a stale count until the next run).
// A trust's ranks are rebuilt as a new generation beside the one readers use, in parallel pieces, and made current by
// one small update (portfolio_settings.ranked_generation): replacing the rows in place made every new index entry meet
// the deleted one with the same key. The generation before stays until the next rebuild, for readers still on it.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE assessment_run_rooms DROP CONSTRAINT IF EXISTS assessment_run_rooms_run_id_fkey`.execute(db);
  await sql`ALTER TABLE portfolio_ranks DROP CONSTRAINT IF EXISTS portfolio_ranks_room_id_fkey`.execute(db);
  await sql`ALTER TABLE portfolio_ranks DROP CONSTRAINT IF EXISTS portfolio_ranks_trust_id_fkey`.execute(db);
  // Rows left behind by runs or rooms deleted before this migration (none while the keys held).
  await sql`DELETE FROM assessment_run_rooms arr WHERE NOT EXISTS (SELECT 1 FROM assessment_runs r WHERE r.id = arr.run_id)`.execute(
    db,
  );

  // Ranks are derived data: they are built again, as generations, on the first read.
  await sql`DELETE FROM portfolio_ranks`.execute(db);
  await sql`UPDATE portfolio_settings SET ranked_weights = NULL, ranked_stamp = NULL`.execute(db);
  await sql`ALTER TABLE portfolio_ranks DROP CONSTRAINT portfolio_ranks_pk`.execute(db);
  await sql`DROP INDEX portfolio_ranks_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_school_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_payback_idx`.execute(db);
  await sql`ALTER TABLE portfolio_ranks ADD COLUMN generation bigint NOT NULL`.execute(db);
  await sql`ALTER TABLE portfolio_ranks ADD CONSTRAINT portfolio_ranks_pk PRIMARY KEY (trust_id, room_id, generation)`.execute(
    db,
  );
  await sql`CREATE UNIQUE INDEX portfolio_ranks_rank_idx ON portfolio_ranks (trust_id, generation, rank)`.execute(db);
  await sql`CREATE INDEX portfolio_ranks_school_rank_idx ON portfolio_ranks (trust_id, school_id, generation, rank)`.execute(
    db,
  );
  await sql`CREATE INDEX portfolio_ranks_payback_idx ON portfolio_ranks (trust_id, generation, simple_payback_years, rank)`.execute(
    db,
  );
  await sql`ALTER TABLE portfolio_settings ADD COLUMN ranked_generation bigint`.execute(db);
  await sql`CREATE SEQUENCE portfolio_rank_generations`.execute(db);
  // The ranks readers see, for reports and checks (the app's own reads name the generation, so indexes serve them).
  await sql`CREATE VIEW current_portfolio_ranks AS
    SELECT pr.* FROM portfolio_ranks pr
      JOIN portfolio_settings ps ON ps.trust_id = pr.trust_id AND ps.ranked_generation = pr.generation`.execute(db);

  await sql`CREATE OR REPLACE FUNCTION room_results_of_deleted_runs() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM room_results rr USING deleted_runs d WHERE rr.run_id = d.id;
      DELETE FROM assessment_run_rooms arr USING deleted_runs d WHERE arr.run_id = d.id;
      RETURN NULL;
    END $$`.execute(db);

  // Through the primary key (trust, room): a room deleted on its own still has its school.
  await sql`CREATE FUNCTION ranks_of_deleted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_rooms d JOIN schools s ON s.id = d.school_id
      WHERE pr.trust_id = s.trust_id AND pr.room_id = d.id;
      -- The ranks left have a gap: the next read ranks the trust again (ranks 1…n, counts right).
      UPDATE portfolio_settings ps SET ranked_stamp = NULL
      WHERE ps.trust_id IN (SELECT s.trust_id FROM deleted_rooms d JOIN schools s ON s.id = d.school_id);
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER rooms_delete_ranks AFTER DELETE ON rooms
    REFERENCING OLD TABLE AS deleted_rooms FOR EACH STATEMENT EXECUTE FUNCTION ranks_of_deleted_rooms()`.execute(db);
  // Rooms deleted with their school no longer find it: the school's own delete takes their ranks.
  await sql`CREATE FUNCTION ranks_of_deleted_schools() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_schools d WHERE pr.trust_id = d.trust_id AND pr.school_id = d.id;
      UPDATE portfolio_settings ps SET ranked_stamp = NULL WHERE ps.trust_id IN (SELECT trust_id FROM deleted_schools);
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER schools_delete_ranks AFTER DELETE ON schools
    REFERENCING OLD TABLE AS deleted_schools FOR EACH STATEMENT EXECUTE FUNCTION ranks_of_deleted_schools()`.execute(
    db,
  );
  await sql`CREATE FUNCTION ranks_of_deleted_trusts() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_trusts d WHERE pr.trust_id = d.id;
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER trusts_delete_ranks AFTER DELETE ON trusts
    REFERENCING OLD TABLE AS deleted_trusts FOR EACH STATEMENT EXECUTE FUNCTION ranks_of_deleted_trusts()`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP VIEW current_portfolio_ranks`.execute(db);
  await sql`DROP SEQUENCE portfolio_rank_generations`.execute(db);
  await sql`ALTER TABLE portfolio_settings DROP COLUMN ranked_generation`.execute(db);
  await sql`DELETE FROM portfolio_ranks`.execute(db);
  await sql`UPDATE portfolio_settings SET ranked_weights = NULL, ranked_stamp = NULL`.execute(db);
  await sql`ALTER TABLE portfolio_ranks DROP CONSTRAINT portfolio_ranks_pk`.execute(db);
  await sql`DROP INDEX portfolio_ranks_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_school_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_payback_idx`.execute(db);
  await sql`ALTER TABLE portfolio_ranks DROP COLUMN generation`.execute(db);
  await sql`ALTER TABLE portfolio_ranks ADD CONSTRAINT portfolio_ranks_pk PRIMARY KEY (trust_id, room_id)`.execute(db);
  await sql`CREATE UNIQUE INDEX portfolio_ranks_rank_idx ON portfolio_ranks (trust_id, rank)`.execute(db);
  await sql`CREATE INDEX portfolio_ranks_school_rank_idx ON portfolio_ranks (trust_id, school_id, rank)`.execute(db);
  await sql`CREATE INDEX portfolio_ranks_payback_idx ON portfolio_ranks (trust_id, simple_payback_years, rank)`.execute(
    db,
  );
  await sql`DROP TRIGGER trusts_delete_ranks ON trusts`.execute(db);
  await sql`DROP FUNCTION ranks_of_deleted_trusts()`.execute(db);
  await sql`DROP TRIGGER schools_delete_ranks ON schools`.execute(db);
  await sql`DROP FUNCTION ranks_of_deleted_schools()`.execute(db);
  await sql`DROP TRIGGER rooms_delete_ranks ON rooms`.execute(db);
  await sql`DROP FUNCTION ranks_of_deleted_rooms()`.execute(db);
  await sql`CREATE OR REPLACE FUNCTION room_results_of_deleted_runs() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM room_results rr USING deleted_runs d WHERE rr.run_id = d.id;
      RETURN NULL;
    END $$`.execute(db);
  await sql`DELETE FROM portfolio_ranks pr WHERE NOT EXISTS (SELECT 1 FROM rooms WHERE rooms.id = pr.room_id)
    OR NOT EXISTS (SELECT 1 FROM trusts t WHERE t.id = pr.trust_id)`.execute(db);
  await sql`DELETE FROM assessment_run_rooms arr WHERE NOT EXISTS (SELECT 1 FROM assessment_runs r WHERE r.id = arr.run_id)`.execute(
    db,
  );
  await sql`ALTER TABLE portfolio_ranks ADD CONSTRAINT portfolio_ranks_trust_id_fkey FOREIGN KEY (trust_id)
    REFERENCES trusts(id) ON DELETE CASCADE`.execute(db);
  await sql`ALTER TABLE portfolio_ranks ADD CONSTRAINT portfolio_ranks_room_id_fkey FOREIGN KEY (room_id)
    REFERENCES rooms(id) ON DELETE CASCADE`.execute(db);
  await sql`ALTER TABLE assessment_run_rooms ADD CONSTRAINT assessment_run_rooms_run_id_fkey FOREIGN KEY (run_id)
    REFERENCES assessment_runs(id) ON DELETE CASCADE`.execute(db);
}
