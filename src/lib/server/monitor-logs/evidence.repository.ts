/**
 * What the engine input reader attaches to each room from the measured-CO2 feature: its active calibration
 * (RoomAssessmentInput.calibration) and its measured analysis (for the risk's measured evidence).
 */
import { sql, type Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import {
  assessRoom,
  type AssumptionSet,
  type RoomAssessment,
  type RoomAssessmentInput,
  type RoomCalibration,
} from '../../engine';
import {
  applyMeasuredEvidence,
  type EvidenceSummary,
  type MeasuredEvidenceInput,
  type MeasuredRoom,
} from '../../engine/measured';

/** A room as the engine input reader gives it, with what this feature adds. */
interface RoomWithEvidence {
  roomId: string;
  input: RoomAssessmentInput;
  measured?: MeasuredRoom | MeasuredEvidenceInput | null;
}

/** Adds each room's active calibration and measured analysis (two indexed reads for the whole chunk). */
export async function attachMeasuredEvidence<T extends RoomWithEvidence>(
  db: Kysely<Database>,
  rooms: T[],
): Promise<T[]> {
  if (rooms.length === 0) return rooms;
  const ids = rooms.map((r) => r.roomId);
  // One array parameter rather than thousands of list parameters for a chunk of rooms.
  const inChunk = sql<boolean>`room_id = ANY(${ids}::uuid[])`;
  const [calibrations, analyses] = await Promise.all([
    db
      .selectFrom('room_calibrations')
      .select(['room_id', 'calibration'])
      .where(inChunk)
      .where('status', '=', 'active')
      .execute(),
    db.selectFrom('monitor_room_analyses').select(['room_id', 'result']).where(inChunk).execute(),
  ]);
  const calibrationOf = new Map(calibrations.map((c) => [c.room_id, c.calibration as unknown as RoomCalibration]));
  const measuredOf = new Map(analyses.map((a) => [a.room_id, a.result as unknown as MeasuredRoom]));
  for (const room of rooms) {
    room.input.calibration = calibrationOf.get(room.roomId) ?? null;
    room.measured = measuredOf.get(room.roomId) ?? null;
  }
  return rooms;
}

/** A room assessed with its calibration, its risk taken from its readings where it has enough. */
export function assessWithEvidence(
  room: { input: RoomAssessmentInput; measured?: MeasuredEvidenceInput | null | undefined },
  set: AssumptionSet,
  options: { withCurve: boolean },
): RoomAssessment & { evidence: EvidenceSummary } {
  const assessment = assessRoom(room.input, set, options);
  const { risk, evidence } = applyMeasuredEvidence({
    assessment,
    measured: room.measured ?? null,
    assumptions: set,
    calibrationLabel: room.input.calibration?.label ?? null,
  });
  return { ...assessment, risk, evidence };
}
