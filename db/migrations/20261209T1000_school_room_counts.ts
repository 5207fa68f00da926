import { sql, type Kysely } from 'kysely';

// Frozen migration: each school's number of rooms in the register, kept by statement-level triggers on rooms, so the
// dashboard's "rooms in the register" is a sum over the trust's schools rather than a count of every room (about
// 40 ms for a 550,000-room estate, on every dashboard read). An import of many rooms updates each school's count once.

export async function up(db: Kysely<any>): Promise<void> {
  await sql`CREATE TABLE school_room_counts (
    school_id uuid PRIMARY KEY REFERENCES schools(id) ON DELETE CASCADE,
    trust_id text NOT NULL,
    rooms integer NOT NULL CHECK (rooms >= 0)
  )`.execute(db);
  await sql`CREATE INDEX school_room_counts_trust_idx ON school_room_counts (trust_id)`.execute(db);
  await sql`INSERT INTO school_room_counts (school_id, trust_id, rooms)
    SELECT s.id, s.trust_id, count(r.id)::int FROM schools s LEFT JOIN rooms r ON r.school_id = s.id GROUP BY s.id`.execute(
    db,
  );
  await sql`CREATE FUNCTION count_inserted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      INSERT INTO school_room_counts (school_id, trust_id, rooms)
      SELECT n.school_id, s.trust_id, count(*)::int FROM new_rooms n JOIN schools s ON s.id = n.school_id
      GROUP BY n.school_id, s.trust_id
      ON CONFLICT (school_id) DO UPDATE SET rooms = school_room_counts.rooms + EXCLUDED.rooms;
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER rooms_count_inserted AFTER INSERT ON rooms
    REFERENCING NEW TABLE AS new_rooms FOR EACH STATEMENT EXECUTE FUNCTION count_inserted_rooms()`.execute(db);
  // A school deleted with its rooms has taken its count row already; the update then finds nothing.
  await sql`CREATE FUNCTION count_deleted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      UPDATE school_room_counts c SET rooms = c.rooms - d.n
      FROM (SELECT school_id, count(*)::int AS n FROM old_rooms GROUP BY school_id) d
      WHERE c.school_id = d.school_id;
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER rooms_count_deleted AFTER DELETE ON rooms
    REFERENCING OLD TABLE AS old_rooms FOR EACH STATEMENT EXECUTE FUNCTION count_deleted_rooms()`.execute(db);
  // Nothing moves a room to another school today; if something does, the counts follow (fires only when an UPDATE
  // names school_id).
  await sql`CREATE FUNCTION count_moved_room() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF NEW.school_id IS DISTINCT FROM OLD.school_id THEN
        UPDATE school_room_counts SET rooms = rooms - 1 WHERE school_id = OLD.school_id;
        INSERT INTO school_room_counts (school_id, trust_id, rooms)
        SELECT NEW.school_id, s.trust_id, 1 FROM schools s WHERE s.id = NEW.school_id
        ON CONFLICT (school_id) DO UPDATE SET rooms = school_room_counts.rooms + 1;
      END IF;
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER rooms_count_moved AFTER UPDATE OF school_id ON rooms
    FOR EACH ROW EXECUTE FUNCTION count_moved_room()`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`DROP TRIGGER rooms_count_moved ON rooms`.execute(db);
  await sql`DROP FUNCTION count_moved_room()`.execute(db);
  await sql`DROP TRIGGER rooms_count_deleted ON rooms`.execute(db);
  await sql`DROP FUNCTION count_deleted_rooms()`.execute(db);
  await sql`DROP TRIGGER rooms_count_inserted ON rooms`.execute(db);
  await sql`DROP FUNCTION count_inserted_rooms()`.execute(db);
  await sql`DROP TABLE school_room_counts`.execute(db);
}
