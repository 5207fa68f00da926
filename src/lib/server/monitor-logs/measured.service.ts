/** What the room page and the trust-wide list show of measured CO2 beside the model. */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import type { CurvePoint, Season } from '../../engine';
import { compareWithModel, type EvidenceSummary, type MeasuredRoom, type RoomComparison } from '../../engine/measured';
import { getCurrentAssumptionSet } from '../assessments/assumptions.repository';
import { readEngineRoom } from '../assessments/engine-input.repository';
import type { ActiveTrust } from '../auth/context';
import { notFound } from '../http/errors';
import { assessWithEvidence } from './evidence.repository';
import { readMeasuredDays } from './readings.repository';

/** Days drawn per season over the predicted curve. */
const CHART_DAYS = 8;

/** One season of the room page's chart: measured days and the model's curve for the same season. */
export interface SeasonChart {
  season: Season;
  predicted: CurvePoint[];
  days: { date: string; points: CurvePoint[] }[];
}

/** The measured part of a room page. */
export interface RoomMeasuredView {
  analysis: MeasuredRoom | null;
  analysedAt: string | null;
  comparison: RoomComparison | null;
  marginPpm: number;
  evidence: EvidenceSummary | null;
  calibrationLabel: string | null;
  charts: SeasonChart[];
  recentDays: { date: string; occupied: boolean; coverage: number; occupiedMeanPpm: number | null; maxPpm: number }[];
}

/** The room's measured seasons, its comparison with the model and chart data; null when it is out of scope. */
export async function getRoomMeasured(
  db: Kysely<Database>,
  trust: ActiveTrust,
  roomId: string,
  marginPpm = 200,
): Promise<RoomMeasuredView | null> {
  const room = await readEngineRoom(db, trust.id, trust.schoolIds, roomId);
  if (!room) return null;
  const stored = await getCurrentAssumptionSet(db, trust.id);
  const row = await db
    .selectFrom('monitor_room_analyses')
    .select(['analysed_at'])
    .where('room_id', '=', roomId)
    .executeTakeFirst();
  const assessment = assessWithEvidence(room, stored.set, { withCurve: true });
  const measured = room.measured ?? null;
  const charts: SeasonChart[] = [];
  if (measured) {
    const byRoom = await readMeasuredDays(db, [roomId], stored.set);
    const all = byRoom.get(roomId) ?? [];
    const window = { from: 7 * 60, to: 18 * 60 };
    for (const season of ['winter', 'mid', 'summer'] as const) {
      const days = all
        .filter((d) => d.season === season && d.weekday >= 1 && d.weekday <= 5 && d.co2Ppm.length > 20)
        .slice(-CHART_DAYS);
      if (days.length === 0) continue;
      charts.push({
        season,
        predicted: assessment.seasons[season].curve,
        days: days.map((d) => {
          const points: CurvePoint[] = [];
          let next = window.from;
          for (let i = 0; i < d.co2Ppm.length; i++) {
            const w = d.wallMin[i] as number;
            if (w < next || w > window.to) continue;
            points.push({ minute: Math.round(w), co2Ppm: d.co2Ppm[i] as number });
            next = w + 4.5;
          }
          return { date: d.date, points };
        }),
      });
    }
  }
  const recent = await db
    .selectFrom('monitor_room_days')
    .select(['day', 'occupied', 'coverage', 'occupied_mean_ppm', 'max_ppm'])
    .where('room_id', '=', roomId)
    .orderBy('day', 'desc')
    .limit(60)
    .execute();
  return {
    analysis: measured,
    analysedAt: row ? new Date(row.analysed_at).toISOString() : null,
    comparison: measured ? compareWithModel(measured, assessment, marginPpm) : null,
    marginPpm,
    evidence: assessment.evidence,
    calibrationLabel: room.input.calibration?.label ?? null,
    charts,
    recentDays: recent.map((d) => ({
      date: String(d.day).slice(0, 10),
      occupied: d.occupied,
      coverage: d.coverage,
      occupiedMeanPpm: d.occupied_mean_ppm,
      maxPpm: d.max_ppm,
    })),
  };
}

/** One room of the trust-wide comparison. */
export interface ComparisonRow {
  roomId: string;
  roomCode: string;
  roomName: string;
  schoolName: string;
  days: number;
  evidence: EvidenceSummary['kind'];
  comparison: RoomComparison;
}

/**
 * Every measured room the member may see, measured against the model (calibrated where it is): those that
 * contradict it by more than the margin first, largest difference first.
 */
export async function listComparison(
  db: Kysely<Database>,
  trust: ActiveTrust,
  marginPpm: number,
  schoolId: string | null,
): Promise<{ rows: ComparisonRow[]; marginPpm: number; contradicting: number }> {
  const limited = trust.schoolIds ? sql`AND r.school_id = ANY(${trust.schoolIds}::uuid[])` : sql``;
  const school = schoolId ? sql`AND r.school_id = ${schoolId}::uuid` : sql``;
  const { rows } = await sql<{ room_id: string; code: string; name: string; school_name: string; days: number }>`
    SELECT a.room_id, r.code, r.name, s.name AS school_name, a.days
    FROM monitor_room_analyses a JOIN rooms r ON r.id = a.room_id JOIN schools s ON s.id = r.school_id
    WHERE a.trust_id = ${trust.id} ${limited} ${school}
    ORDER BY s.name, r.code`.execute(db);
  const stored = await getCurrentAssumptionSet(db, trust.id);
  const out: ComparisonRow[] = [];
  for (let i = 0; i < rows.length; i += 10) {
    const batch = await Promise.all(
      rows.slice(i, i + 10).map(async (r) => {
        const room = await readEngineRoom(db, trust.id, trust.schoolIds, r.room_id);
        if (!room?.measured) return null;
        try {
          const assessment = assessWithEvidence(room, stored.set, { withCurve: false });
          return {
            roomId: r.room_id,
            roomCode: r.code,
            roomName: r.name,
            schoolName: r.school_name,
            days: r.days,
            evidence: assessment.evidence.kind,
            comparison: compareWithModel(room.measured, assessment, marginPpm),
          } satisfies ComparisonRow;
        } catch {
          return null;
        }
      }),
    );
    for (const b of batch) if (b) out.push(b);
  }
  const contradicts = (c: RoomComparison) =>
    c.direction === 'staler_than_predicted' || c.direction === 'fresher_than_predicted';
  out.sort(
    (a, b) =>
      Number(contradicts(b.comparison)) - Number(contradicts(a.comparison)) ||
      Math.abs(b.comparison.largest?.differencePpm ?? 0) - Math.abs(a.comparison.largest?.differencePpm ?? 0),
  );
  return { rows: out, marginPpm, contradicting: out.filter((r) => contradicts(r.comparison)).length };
}

export { notFound };
