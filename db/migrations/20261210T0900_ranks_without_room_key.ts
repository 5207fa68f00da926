import { sql, type Kysely } from 'kysely';

// Frozen migration: portfolio_ranks loses its primary key (trust, room, generation). A rebuild writes each of a
// trust's rooms once per generation, in rank order, so the key only cost an index entry at a random place per row
// written (about a third of a 100,000-room rebuild's writing). Its readers by room go through the room's school
// instead (the school index), and the unique (trust, generation, rank) still refuses a row written twice.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`ALTER TABLE portfolio_ranks DROP CONSTRAINT portfolio_ranks_pk`.execute(db);
  // A deleted room's ranks are found through its school's index.
  await sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_rooms d JOIN schools s ON s.id = d.school_id
      WHERE pr.trust_id = s.trust_id AND pr.school_id = d.school_id AND pr.room_id = d.id;
      -- The ranks left have a gap: the next read ranks the trust again (ranks 1…n, counts right).
      UPDATE portfolio_settings ps SET ranked_stamp = NULL
      WHERE ps.trust_id IN (SELECT s.trust_id FROM deleted_rooms d JOIN schools s ON s.id = d.school_id);
      RETURN NULL;
    END $$`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`CREATE OR REPLACE FUNCTION ranks_of_deleted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM portfolio_ranks pr USING deleted_rooms d JOIN schools s ON s.id = d.school_id
      WHERE pr.trust_id = s.trust_id AND pr.room_id = d.id;
      UPDATE portfolio_settings ps SET ranked_stamp = NULL
      WHERE ps.trust_id IN (SELECT s.trust_id FROM deleted_rooms d JOIN schools s ON s.id = d.school_id);
      RETURN NULL;
    END $$`.execute(db);
  await sql`ALTER TABLE portfolio_ranks ADD CONSTRAINT portfolio_ranks_pk PRIMARY KEY (trust_id, room_id, generation)`.execute(
    db,
  );
}
