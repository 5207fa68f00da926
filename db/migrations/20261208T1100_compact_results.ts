import { sql, type Kysely } from 'kysely';

// Frozen migration: compact results and runs split into chunks (national scale).
//  - A run is split into chunks of rooms that any worker process may take. Each chunk keeps its state, its worker's
//    heartbeat and attempts, and, once done, a gzip'd snapshot of the engine inputs it read (the room page and the
//    what-if recompute a result's detail from it with the run's assumption set).
//  - A result row keeps numbers and codes only: the ~7 kB detail document goes. The appraisal figures the capital
//    programme and the finance view read (installed cost, life, unit lines) become columns, filled from the detail
//    of the results already stored.
//  - Which results are current is one pointer per school (assessment_current), switched in one transaction when a
//    run finishes, instead of a flag rewritten on every row; current_room_results is the view readers use.
//  - No row-by-row foreign keys on room_results (each costs a lookup per row written): results of a deleted run, and
//    the current results of deleted rooms, are removed by statement-level triggers instead.
//  - Per run and school, the dashboard's aggregates (run_school_summaries), computed when the run finishes.
//  - A retention rule per trust (assessment_settings.keep_runs): older runs' results are pruned.

const RESULT_COLUMNS_FROM_DETAIL = sql`
  installed_cost_gbp = CASE WHEN unit_count > 0 THEN (detail->'appraisal'->>'capitalCostGbp')::float8 END,
  life_years = CASE WHEN unit_count > 0 THEN (detail->'appraisal'->>'lifeYears')::float8 END,
  unit_lines = CASE WHEN unit_count > 0 THEN (
    SELECT jsonb_agg(jsonb_build_array((l->>'count')::int, l->>'modelName'))::text
    FROM jsonb_array_elements(detail->'appraisal'->'units') l) END`;

export async function up(db: Kysely<any>): Promise<void> {
  // Runs still in flight under the old executor cannot resume in chunks: they end with a message to start again.
  await sql`UPDATE assessment_runs SET status = 'failed', finished_at = now(), updated_at = now(),
    error = 'Airtally was upgraded while this run was in progress. Start the assessment again.'
    WHERE status IN ('queued', 'running')`.execute(db);

  await db.schema
    .alterTable('assessment_runs')
    .dropColumn('resume_after_room_id')
    .dropColumn('worker_id')
    .dropColumn('job_id')
    .dropColumn('attempts')
    .addColumn('chunks_total', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('chunks_done', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('results_pruned_at', 'timestamptz')
    .execute();

  await db.schema
    .createTable('assessment_run_chunks')
    .addColumn('run_id', 'uuid', (c) => c.notNull().references('assessment_runs.id').onDelete('cascade'))
    .addColumn('chunk_no', 'integer', (c) => c.notNull())
    // The chunk is the run's snapshot rooms with after_room_id < id <= last_room_id (after_room_id null: from the first).
    .addColumn('after_room_id', 'uuid')
    .addColumn('last_room_id', 'uuid', (c) => c.notNull())
    .addColumn('rooms', 'integer', (c) => c.notNull())
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('pending'))
    .addColumn('worker_id', 'text')
    .addColumn('heartbeat_at', 'timestamptz')
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('results', 'integer')
    .addColumn('inputs', 'bytea')
    .addColumn('done_at', 'timestamptz')
    .addPrimaryKeyConstraint('assessment_run_chunks_pk', ['run_id', 'chunk_no'])
    .addCheckConstraint('assessment_run_chunks_status_known', sql`status IN ('pending', 'running', 'done')`)
    .execute();
  // The inputs are gzip'd already: stored out of line without a second compression attempt.
  await sql`ALTER TABLE assessment_run_chunks ALTER COLUMN inputs SET STORAGE EXTERNAL`.execute(db);
  await sql`CREATE INDEX assessment_run_chunks_running_idx ON assessment_run_chunks (heartbeat_at) WHERE status = 'running'`.execute(
    db,
  );

  await db.schema
    .createTable('assessment_current')
    .addColumn('school_id', 'uuid', (c) => c.primaryKey().references('schools.id').onDelete('cascade'))
    .addColumn('trust_id', 'text', (c) => c.notNull().references('trusts.id').onDelete('cascade'))
    .addColumn('run_id', 'uuid', (c) => c.notNull().references('assessment_runs.id').onDelete('cascade'))
    .execute();
  await sql`CREATE INDEX assessment_current_trust_idx ON assessment_current (trust_id, run_id)`.execute(db);
  await sql`CREATE INDEX assessment_current_run_idx ON assessment_current (run_id)`.execute(db);
  await sql`
    INSERT INTO assessment_current (school_id, trust_id, run_id)
    SELECT DISTINCT ON (rr.school_id) rr.school_id, rr.trust_id, rr.run_id
    FROM room_results rr JOIN schools s ON s.id = rr.school_id
    WHERE rr.is_current ORDER BY rr.school_id, rr.run_id`.execute(db);

  await db.schema
    .alterTable('room_results')
    .addColumn('installed_cost_gbp', 'double precision')
    .addColumn('life_years', 'double precision')
    .addColumn('unit_lines', 'text')
    .execute();
  await sql`UPDATE room_results SET ${RESULT_COLUMNS_FROM_DETAIL}`.execute(db);
  await sql`ALTER TABLE room_results DROP CONSTRAINT IF EXISTS room_results_room_id_fkey`.execute(db);
  await sql`ALTER TABLE room_results DROP CONSTRAINT IF EXISTS room_results_run_id_fkey`.execute(db);
  await db.schema
    .alterTable('room_results')
    .dropColumn('detail')
    .dropColumn('is_current')
    .dropColumn('trust_id')
    .execute();
  await sql`CREATE INDEX room_results_run_school_idx ON room_results (run_id, school_id)`.execute(db);
  await sql`CREATE VIEW current_room_results AS
    SELECT ac.trust_id, rr.*
    FROM assessment_current ac JOIN room_results rr ON rr.run_id = ac.run_id AND rr.school_id = ac.school_id`.execute(
    db,
  );

  await db.schema
    .createTable('run_school_summaries')
    .addColumn('run_id', 'uuid', (c) => c.notNull().references('assessment_runs.id').onDelete('cascade'))
    .addColumn('school_id', 'uuid', (c) => c.notNull())
    .addColumn('assessed', 'integer', (c) => c.notNull())
    .addColumn('failing', 'integer', (c) => c.notNull())
    .addColumn('pupils_failing', 'bigint', (c) => c.notNull())
    .addColumn('retrofitted', 'integer', (c) => c.notNull())
    .addColumn('retrofitted_never_pay_back', 'integer', (c) => c.notNull())
    .addColumn('capital_gbp', 'double precision', (c) => c.notNull())
    .addColumn('saving_gbp', 'double precision', (c) => c.notNull())
    .addColumn('measured', 'integer', (c) => c.notNull())
    .addColumn('calibrated', 'integer', (c) => c.notNull())
    .addColumn('co2_below_1000', 'integer', (c) => c.notNull())
    .addColumn('co2_1000_1500', 'integer', (c) => c.notNull())
    .addColumn('co2_1500_2000', 'integer', (c) => c.notNull())
    .addColumn('co2_above_2000', 'integer', (c) => c.notNull())
    .addColumn('baseline_today', 'integer', (c) => c.notNull())
    .addColumn('baseline_same_air', 'integer', (c) => c.notNull())
    .addColumn('baseline_simpler', 'integer', (c) => c.notNull())
    .addPrimaryKeyConstraint('run_school_summaries_pk', ['run_id', 'school_id'])
    .execute();
  // The one definition of a run's dashboard figures per school (all schools with p_schools null).
  await sql`CREATE FUNCTION refresh_run_school_summaries(p_run uuid, p_schools uuid[]) RETURNS void LANGUAGE sql AS $$
    DELETE FROM run_school_summaries WHERE run_id = p_run AND (p_schools IS NULL OR school_id = ANY(p_schools));
    INSERT INTO run_school_summaries
    SELECT run_id, school_id, count(*), count(*) FILTER (WHERE NOT criteria_met),
      coalesce(sum(pupils) FILTER (WHERE NOT criteria_met), 0),
      count(*) FILTER (WHERE unit_count > 0 AND capital_cost_gbp IS NOT NULL),
      count(*) FILTER (WHERE unit_count > 0 AND capital_cost_gbp IS NOT NULL AND simple_payback_years IS NULL),
      coalesce(sum(capital_cost_gbp) FILTER (WHERE unit_count > 0 AND capital_cost_gbp IS NOT NULL), 0),
      coalesce(sum(annual_saving_gbp) FILTER (WHERE unit_count > 0 AND capital_cost_gbp IS NOT NULL), 0),
      count(*) FILTER (WHERE risk_evidence = 'measured'), count(*) FILTER (WHERE risk_evidence = 'calibrated'),
      count(*) FILTER (WHERE mean_co2_ppm < 1000), count(*) FILTER (WHERE mean_co2_ppm >= 1000 AND mean_co2_ppm < 1500),
      count(*) FILTER (WHERE mean_co2_ppm >= 1500 AND mean_co2_ppm < 2000), count(*) FILTER (WHERE mean_co2_ppm >= 2000),
      count(*) FILTER (WHERE baseline = 'today'), count(*) FILTER (WHERE baseline = 'same_air_without_recovery'),
      count(*) FILTER (WHERE baseline = 'simpler_option')
    FROM room_results WHERE run_id = p_run AND (p_schools IS NULL OR school_id = ANY(p_schools))
    GROUP BY run_id, school_id;
  $$`.execute(db);
  await sql`SELECT refresh_run_school_summaries(run_id, NULL) FROM (SELECT DISTINCT run_id FROM assessment_current) x`.execute(
    db,
  );

  // A deleted run takes its results with it (one statement for all of them, through the primary key).
  await sql`CREATE FUNCTION room_results_of_deleted_runs() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      DELETE FROM room_results rr USING deleted_runs d WHERE rr.run_id = d.id;
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER assessment_runs_delete_results AFTER DELETE ON assessment_runs
    REFERENCING OLD TABLE AS deleted_runs FOR EACH STATEMENT EXECUTE FUNCTION room_results_of_deleted_runs()`.execute(
    db,
  );
  // A deleted room leaves the current results (and their school's dashboard figures) at once; older runs keep their
  // record of it until they are pruned.
  await sql`CREATE FUNCTION current_results_of_deleted_rooms() RETURNS trigger LANGUAGE plpgsql AS $$
    DECLARE touched record;
    BEGIN
      FOR touched IN
        WITH gone AS (
          DELETE FROM room_results rr USING deleted_rooms d, assessment_current ac
          WHERE ac.school_id = d.school_id AND rr.run_id = ac.run_id AND rr.room_id = d.id
          RETURNING rr.run_id, rr.school_id
        )
        SELECT run_id, array_agg(DISTINCT school_id) AS schools FROM gone GROUP BY run_id
      LOOP
        PERFORM refresh_run_school_summaries(touched.run_id, touched.schools);
      END LOOP;
      RETURN NULL;
    END $$`.execute(db);
  await sql`CREATE TRIGGER rooms_delete_current_results AFTER DELETE ON rooms
    REFERENCING OLD TABLE AS deleted_rooms FOR EACH STATEMENT EXECUTE FUNCTION current_results_of_deleted_rooms()`.execute(
    db,
  );

  await db.schema
    .createTable('assessment_settings')
    .addColumn('trust_id', 'text', (c) => c.primaryKey().references('trusts.id').onDelete('cascade'))
    .addColumn('keep_runs', 'integer', (c) => c.notNull())
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_by_email', 'text')
    .addCheckConstraint('assessment_settings_keep_runs_range', sql`keep_runs BETWEEN 1 AND 100`)
    .execute();

  // Ranks carry the run of each room's result, so pages join result rows through their primary key.
  await sql`DELETE FROM portfolio_ranks`.execute(db);
  await sql`UPDATE portfolio_settings SET ranked_weights = NULL, ranked_stamp = NULL`.execute(db);
  await db.schema
    .alterTable('portfolio_ranks')
    .addColumn('run_id', 'uuid', (c) => c.notNull())
    .addColumn('pupil_hours_removed', 'double precision')
    .execute();
  await db.schema.alterTable('portfolio_settings').addColumn('ranked_curve', 'jsonb').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('portfolio_settings').dropColumn('ranked_curve').execute();
  await sql`DELETE FROM portfolio_ranks`.execute(db);
  await sql`UPDATE portfolio_settings SET ranked_weights = NULL, ranked_stamp = NULL`.execute(db);
  await db.schema.alterTable('portfolio_ranks').dropColumn('run_id').dropColumn('pupil_hours_removed').execute();
  await db.schema.dropTable('assessment_settings').execute();
  await sql`DROP TRIGGER rooms_delete_current_results ON rooms`.execute(db);
  await sql`DROP FUNCTION current_results_of_deleted_rooms()`.execute(db);
  await sql`DROP TRIGGER assessment_runs_delete_results ON assessment_runs`.execute(db);
  await sql`DROP FUNCTION room_results_of_deleted_runs()`.execute(db);
  await sql`DROP FUNCTION refresh_run_school_summaries(uuid, uuid[])`.execute(db);
  await db.schema.dropTable('run_school_summaries').execute();
  await sql`DROP VIEW current_room_results`.execute(db);
  await sql`DROP INDEX room_results_run_school_idx`.execute(db);
  // Results of runs since deleted, or of rooms since deleted, cannot satisfy the foreign keys again.
  await sql`DELETE FROM room_results rr WHERE NOT EXISTS (SELECT 1 FROM assessment_runs r WHERE r.id = rr.run_id)
    OR NOT EXISTS (SELECT 1 FROM rooms WHERE rooms.id = rr.room_id)`.execute(db);
  await db.schema
    .alterTable('room_results')
    .addColumn('trust_id', 'text')
    .addColumn('is_current', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('detail', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
    .execute();
  await sql`UPDATE room_results rr SET trust_id = r.trust_id FROM assessment_runs r WHERE r.id = rr.run_id`.execute(db);
  await sql`ALTER TABLE room_results ALTER COLUMN trust_id SET NOT NULL`.execute(db);
  await sql`UPDATE room_results rr SET is_current = true FROM assessment_current ac
    WHERE ac.run_id = rr.run_id AND ac.school_id = rr.school_id`.execute(db);
  await sql`ALTER TABLE room_results ADD CONSTRAINT room_results_run_id_fkey FOREIGN KEY (run_id)
    REFERENCES assessment_runs(id) ON DELETE CASCADE`.execute(db);
  await sql`ALTER TABLE room_results ADD CONSTRAINT room_results_room_id_fkey FOREIGN KEY (room_id)
    REFERENCES rooms(id) ON DELETE CASCADE`.execute(db);
  await sql`CREATE INDEX room_results_current_school_idx ON room_results (trust_id, school_id) WHERE is_current`.execute(
    db,
  );
  await sql`CREATE INDEX room_results_current_payback_idx ON room_results (trust_id, simple_payback_years) WHERE is_current`.execute(
    db,
  );
  await sql`CREATE INDEX room_results_room_idx ON room_results (room_id) WHERE is_current`.execute(db);
  await db.schema
    .alterTable('room_results')
    .dropColumn('installed_cost_gbp')
    .dropColumn('life_years')
    .dropColumn('unit_lines')
    .execute();
  await db.schema.dropTable('assessment_current').execute();
  await db.schema.dropTable('assessment_run_chunks').execute();
  await db.schema
    .alterTable('assessment_runs')
    .dropColumn('chunks_total')
    .dropColumn('chunks_done')
    .dropColumn('results_pruned_at')
    .addColumn('resume_after_room_id', 'uuid')
    .addColumn('worker_id', 'text')
    .addColumn('job_id', 'text')
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .execute();
}
