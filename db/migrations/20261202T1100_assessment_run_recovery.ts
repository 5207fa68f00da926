import { sql, type Kysely } from 'kysely';

// Frozen migration: runs that recover. A running run's worker beats a heartbeat and names itself, so a
// dead worker is noticed within a minute and its run resumed (or, after its last attempt, failed); and
// a run assesses the fixed set of rooms it snapshots when it starts, however the register changes meanwhile.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .alterTable('assessment_runs')
    .addColumn('heartbeat_at', 'timestamptz')
    .addColumn('worker_id', 'text')
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .execute();
  await db.schema
    .createTable('assessment_run_rooms')
    .addColumn('run_id', 'uuid', (c) => c.notNull().references('assessment_runs.id').onDelete('cascade'))
    // No foreign key to rooms: a room deleted during the run is simply skipped.
    .addColumn('room_id', 'uuid', (c) => c.notNull())
    .addPrimaryKeyConstraint('assessment_run_rooms_pk', ['run_id', 'room_id'])
    .execute();
  // Runs still queued or running when this lands carry on with the rooms in scope they have not done yet.
  await sql`
    INSERT INTO assessment_run_rooms (run_id, room_id)
    SELECT r.id, rooms.id
    FROM assessment_runs r
    JOIN schools ON schools.trust_id = r.trust_id AND (r.school_id IS NULL OR schools.id = r.school_id)
    JOIN rooms ON rooms.school_id = schools.id
    WHERE r.status IN ('queued', 'running')
      AND (r.resume_after_room_id IS NULL OR rooms.id > r.resume_after_room_id::uuid)`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('assessment_run_rooms').execute();
  await db.schema
    .alterTable('assessment_runs')
    .dropColumn('heartbeat_at')
    .dropColumn('worker_id')
    .dropColumn('attempts')
    .execute();
}
