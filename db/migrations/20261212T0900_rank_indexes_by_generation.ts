import { sql, type Kysely } from 'kysely';

// Frozen migration: portfolio_ranks' indexes lead with the generation instead of the trust. Generations come from one
// sequence, so a generation names its trust; the trust's id (text, about 33 bytes) in every index entry only made a
// rebuild's writing slower: at 550,000 rooms, inserting a generation took 8.5 s with the trust-led indexes and 5.8 s
// with generation-led ones, and the indexes took 190 MB against 79 MB.
//
// What used to find rows by trust without a generation now finds the trust's generations first, in
// portfolio_rank_builds (one row per rebuild, written and committed before the rebuild writes its rows, so the rows of
// a rebuild that failed are found too): the deletes of old generations, and the triggers that take a deleted room's,
// school's or trust's ranks with it.

const ROOMS_TRIGGER_UP = sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr
        USING deleted_rooms d JOIN schools s ON s.id = d.school_id JOIN portfolio_rank_builds b ON b.trust_id = s.trust_id
      WHERE pr.generation = b.generation AND pr.school_id = d.school_id AND pr.room_id = d.id;
      -- The ranks left have a gap: the next read ranks the trust again (ranks 1…n, counts right).
      UPDATE portfolio_settings ps SET ranked_stamp = NULL
      WHERE ps.trust_id IN (SELECT s.trust_id FROM deleted_rooms d JOIN schools s ON s.id = d.school_id);
      RETURN NULL;
    END $$`;

const SCHOOLS_TRIGGER_UP = sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_schools() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_schools d JOIN portfolio_rank_builds b ON b.trust_id = d.trust_id
      WHERE pr.generation = b.generation AND pr.school_id = d.id;
      UPDATE portfolio_settings ps SET ranked_stamp = NULL WHERE ps.trust_id IN (SELECT trust_id FROM deleted_schools);
      RETURN NULL;
    END $$`;

const TRUSTS_TRIGGER_UP = sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_trusts() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_trusts d JOIN portfolio_rank_builds b ON b.trust_id = d.id
      WHERE pr.generation = b.generation;
      DELETE FROM portfolio_rank_builds b USING deleted_trusts d WHERE b.trust_id = d.id;
      RETURN NULL;
    END $$`;

export async function up(db: Kysely<any>): Promise<void> {
  // No foreign key to trusts: the trusts trigger needs these rows after the trust's own rows are gone.
  await sql`CREATE TABLE portfolio_rank_builds (
    generation bigint PRIMARY KEY DEFAULT nextval('portfolio_rank_generations'),
    trust_id text NOT NULL,
    started_at timestamptz NOT NULL DEFAULT now())`.execute(db);
  await sql`CREATE INDEX portfolio_rank_builds_trust_idx ON portfolio_rank_builds (trust_id, generation)`.execute(db);
  await sql`INSERT INTO portfolio_rank_builds (generation, trust_id)
    SELECT DISTINCT generation, trust_id FROM portfolio_ranks`.execute(db);

  await sql`DROP INDEX portfolio_ranks_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_school_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_payback_idx`.execute(db);
  await sql`CREATE UNIQUE INDEX portfolio_ranks_rank_idx ON portfolio_ranks (generation, rank)`.execute(db);
  await sql`CREATE INDEX portfolio_ranks_school_rank_idx ON portfolio_ranks (generation, school_id, rank)`.execute(db);
  await sql`CREATE INDEX portfolio_ranks_payback_idx ON portfolio_ranks (generation, simple_payback_years, rank)`.execute(
    db,
  );

  await ROOMS_TRIGGER_UP.execute(db);
  await SCHOOLS_TRIGGER_UP.execute(db);
  await TRUSTS_TRIGGER_UP.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP INDEX portfolio_ranks_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_school_rank_idx`.execute(db);
  await sql`DROP INDEX portfolio_ranks_payback_idx`.execute(db);
  await sql`CREATE UNIQUE INDEX portfolio_ranks_rank_idx ON portfolio_ranks (trust_id, generation, rank)`.execute(db);
  await sql`CREATE INDEX portfolio_ranks_school_rank_idx ON portfolio_ranks (trust_id, school_id, generation, rank)`.execute(
    db,
  );
  await sql`CREATE INDEX portfolio_ranks_payback_idx ON portfolio_ranks (trust_id, generation, simple_payback_years, rank)`.execute(
    db,
  );
  // The trigger bodies of 20261210T0900 (rooms) and 20261209T0900 (schools, trusts).
  await sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_rooms d JOIN schools s ON s.id = d.school_id
      WHERE pr.trust_id = s.trust_id AND pr.school_id = d.school_id AND pr.room_id = d.id;
      UPDATE portfolio_settings ps SET ranked_stamp = NULL
      WHERE ps.trust_id IN (SELECT s.trust_id FROM deleted_rooms d JOIN schools s ON s.id = d.school_id);
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_schools() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_schools d WHERE pr.trust_id = d.trust_id AND pr.school_id = d.id;
      UPDATE portfolio_settings ps SET ranked_stamp = NULL WHERE ps.trust_id IN (SELECT trust_id FROM deleted_schools);
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_trusts() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_trusts d WHERE pr.trust_id = d.id;
      RETURN NULL;
    END $$`.execute(db);
  await sql`DROP TABLE portfolio_rank_builds`.execute(db);
}
