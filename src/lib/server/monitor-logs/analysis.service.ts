/**
 * The analysis of committed readings, room by room, as a queued job with progress: per room-day statistics
 * for the day lists, and the per-season measured picture the room page, the comparison list, calibration
 * and the ranking's measured evidence read. Runs after every commit, mapping change and deletion (for the
 * rooms concerned) and on request for the whole trust.
 */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type pg from 'pg';
import { assessRoom, EngineInputError } from '../../engine';
import { analyseRoom, measuredThresholds, type MeasuredRoom } from '../../engine/measured';
import { getCurrentAssumptionSet } from '../assessments/assumptions.repository';
import { readEngineRoom } from '../assessments/engine-input.repository';
import { getQueue } from '../assessments/queue';
import { copyLine, copyLines, copyPieces } from '../db/copy';
import { getDb, getPool, withConnection } from '../db/client';
import { readMeasuredDays } from './readings.repository';

/** The pg-boss queue of measured-CO2 analyses. */
export const ANALYSIS_QUEUE = 'monitor-analysis';
const ROOMS_PER_CHUNK = 20;

let ready: Promise<void> | undefined;

/** Registers the analysis queue and its worker on the app's pg-boss (once per process). */
function ensureWorker(): Promise<void> {
  ready ??= (async () => {
    const boss = await getQueue();
    await boss.createQueue(ANALYSIS_QUEUE, {
      name: ANALYSIS_QUEUE,
      retryLimit: 1,
      retryDelay: 2,
      expireInSeconds: 1800,
    });
    await boss.work<{ runId: string }>(ANALYSIS_QUEUE, { batchSize: 1, pollingIntervalSeconds: 1 }, async ([job]) => {
      if (job) await runAnalysis(getDb(), getPool(), job.data.runId);
    });
  })().catch((error: unknown) => {
    ready = undefined;
    throw error;
  });
  return ready;
}

/** Queues an analysis of some rooms (null: every room with readings) and returns the run's id. */
export async function requestAnalysis(
  db: Kysely<Database>,
  trustId: string,
  roomIds: string[] | null,
  email: string | null,
): Promise<string> {
  const run = await db
    .insertInto('monitor_analysis_runs')
    .values({ trust_id: trustId, room_ids: roomIds, created_by_email: email })
    .returning('id')
    .executeTakeFirstOrThrow();
  await ensureWorker();
  const boss = await getQueue();
  await boss.send(ANALYSIS_QUEUE, { runId: run.id });
  return run.id;
}

/** A run's state as the progress bar shows it. */
export interface AnalysisRunView {
  id: string;
  status: string;
  roomsDone: number;
  roomsTotal: number;
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
}

/** The trust's latest analysis run, or one by id. */
export async function getAnalysisRun(
  db: Kysely<Database>,
  trustId: string,
  id: string | null,
): Promise<AnalysisRunView | null> {
  let q = db.selectFrom('monitor_analysis_runs').selectAll().where('trust_id', '=', trustId);
  q = id ? q.where('id', '=', id) : q.orderBy('created_at', 'desc').limit(1);
  const r = await q.executeTakeFirst();
  if (!r) return null;
  return {
    id: r.id,
    status: r.status,
    roomsDone: r.rooms_done,
    roomsTotal: r.rooms_total,
    error: r.error,
    createdAt: new Date(r.created_at).toISOString(),
    finishedAt: r.finished_at ? new Date(r.finished_at).toISOString() : null,
  };
}

const arrayText = (values: readonly number[]) =>
  `{${values.map((v) => (Number.isFinite(v) ? String(v) : 'NULL')).join(',')}}`;

/** Works one analysis run to the end (the worker calls it; so do the benchmark and tests). */
export async function runAnalysis(db: Kysely<Database>, pool: pg.Pool, runId: string): Promise<void> {
  const run = await db.selectFrom('monitor_analysis_runs').selectAll().where('id', '=', runId).executeTakeFirst();
  if (!run || run.status === 'succeeded' || run.status === 'failed') return;
  try {
    const stored = await getCurrentAssumptionSet(db, run.trust_id);
    const set = stored.set;
    // Rooms: the ones named, or every room of the trust that has readings or an analysis.
    const roomIds =
      run.room_ids ??
      (
        await sql<{ room_id: string }>`
        SELECT DISTINCT s.room_id FROM monitor_log_sensors s JOIN monitor_logs l ON l.id = s.log_id
        WHERE l.trust_id = ${run.trust_id} AND l.status = 'committed' AND s.room_id IS NOT NULL
        UNION SELECT room_id FROM monitor_room_analyses WHERE trust_id = ${run.trust_id}`.execute(db)
      ).rows.map((r) => r.room_id);
    await db
      .updateTable('monitor_analysis_runs')
      .set({ status: 'running', rooms_total: roomIds.length, rooms_done: 0 })
      .where('id', '=', runId)
      .execute();
    for (let at = 0; at < roomIds.length; at += ROOMS_PER_CHUNK) {
      const chunk = roomIds.slice(at, at + ROOMS_PER_CHUNK);
      const days = await readMeasuredDays(db, chunk, set);
      const analyses: { roomId: string; schoolId: string; room: MeasuredRoom; packId: string }[] = [];
      const dayLines: string[] = [];
      for (const roomId of chunk) {
        const list = days.get(roomId);
        if (!list || list.length === 0) continue;
        const engineRoom = await readEngineRoom(db, run.trust_id, null, roomId);
        if (!engineRoom) continue;
        let assessment: ReturnType<typeof assessRoom>;
        try {
          assessment = assessRoom({ ...engineRoom.input, calibration: null }, set, { withCurve: false });
        } catch (error) {
          if (error instanceof EngineInputError) continue;
          throw error;
        }
        const result = analyseRoom({
          days: list,
          timetable: set.occupancy.timetable.value,
          volumeM3: assessment.volumeM3,
          generationLpsBySeason: {
            winter: assessment.seasons.winter.generationLps,
            mid: assessment.seasons.mid.generationLps,
            summer: assessment.seasons.summer.generationLps,
          },
          criterion: assessment.criterion,
          assumedOutdoorPpm: set.air.outdoorCo2Ppm.value,
        });
        analyses.push({
          roomId,
          schoolId: engineRoom.schoolId,
          room: result.room,
          packId: assessment.criterion.packId,
        });
        const thresholds = arrayText(measuredThresholds(assessment.criterion));
        for (const d of result.days)
          dayLines.push(
            copyLine([
              roomId,
              d.date,
              run.trust_id,
              d.season,
              d.readings,
              d.coverage,
              d.occupied,
              d.occupiedMeanPpm,
              d.minPpm,
              d.maxPpm,
              d.nightMinPpm,
              thresholds,
              arrayText(d.minutesOver),
              arrayText(d.longestRunMinutes),
            ]),
          );
      }
      await withConnection(pool, async (conn, client) => {
        await conn.transaction().execute(async (trx) => {
          await trx.deleteFrom('monitor_room_days').where('room_id', 'in', chunk).execute();
          await trx.deleteFrom('monitor_room_analyses').where('room_id', 'in', chunk).execute();
          if (dayLines.length > 0)
            await copyLines(
              client,
              'COPY monitor_room_days (room_id, day, trust_id, season, reading_count, coverage, occupied, occupied_mean_ppm, min_ppm, max_ppm, night_min_ppm, thresholds_ppm, minutes_over, longest_run_minutes) FROM STDIN',
              copyPieces(dayLines, (l) => l),
            );
          if (analyses.length > 0)
            await trx
              .insertInto('monitor_room_analyses')
              .values(
                analyses.map((a) => ({
                  room_id: a.roomId,
                  trust_id: run.trust_id,
                  school_id: a.schoolId,
                  days: a.room.days,
                  first_date: a.room.firstDate,
                  last_date: a.room.lastDate,
                  result: JSON.stringify(a.room),
                  criterion_pack_id: a.packId,
                  assumptions_version: stored.label,
                })),
              )
              .execute();
          await trx
            .updateTable('monitor_analysis_runs')
            .set({ rooms_done: sql`rooms_done + ${chunk.length}` })
            .where('id', '=', runId)
            .execute();
        });
      });
    }
    await db
      .updateTable('monitor_analysis_runs')
      .set({ status: 'succeeded', finished_at: new Date() })
      .where('id', '=', runId)
      .execute();
  } catch (error) {
    await db
      .updateTable('monitor_analysis_runs')
      .set({ status: 'failed', finished_at: new Date(), error: error instanceof Error ? error.message : String(error) })
      .where('id', '=', runId)
      .execute();
    throw error;
  }
}
