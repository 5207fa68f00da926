/** Calibrating a room's model from its measured seasons, versioned per room and revertible, every change audited. */
import type { Kysely } from 'kysely';
import type { Database } from '../../../../db/database';
import { calibrateRoom, type AirChangeEstimate, type CalibrationFit, type MeasuredRoom } from '../../engine/measured';
import { recordAudit, type AuditEntry } from '../audit/audit.repository';
import type { ActiveTrust } from '../auth/context';
import { getCurrentAssumptionSet } from '../assessments/assumptions.repository';
import { readEngineRoom } from '../assessments/engine-input.repository';
import { badRequest, conflict, notFound } from '../http/errors';

type Actor = Pick<AuditEntry, 'actorUserId' | 'actorEmail'>;

/** One version of a room's calibration. */
export interface CalibrationVersion {
  id: string;
  version: number;
  status: string;
  label: string;
  daysUsed: number;
  fit: CalibrationFit;
  assumptionsVersion: string;
  createdAt: string;
  createdByEmail: string | null;
  endedAt: string | null;
  endedByEmail: string | null;
}

/** The room's calibration versions, newest first (404 outside the member's scope). */
export async function listCalibrations(
  db: Kysely<Database>,
  trust: ActiveTrust,
  roomId: string,
): Promise<CalibrationVersion[]> {
  if (!(await readEngineRoom(db, trust.id, trust.schoolIds, roomId))) throw notFound('That room');
  const rows = await db
    .selectFrom('room_calibrations')
    .selectAll()
    .where('room_id', '=', roomId)
    .orderBy('version', 'desc')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    version: r.version,
    status: r.status,
    label: r.label,
    daysUsed: r.days_used,
    fit: r.fit as unknown as CalibrationFit,
    assumptionsVersion: r.assumptions_version,
    createdAt: new Date(r.created_at).toISOString(),
    createdByEmail: r.created_by_email,
    endedAt: r.ended_at ? new Date(r.ended_at).toISOString() : null,
    endedByEmail: r.ended_by_email,
  }));
}

/** The after-school decay to take infiltration from: the most trustworthy season's. */
function bestAfterSchoolDecay(measured: MeasuredRoom): AirChangeEstimate | null {
  const rank = { high: 3, medium: 2, low: 1, none: 0 } as const;
  let best: AirChangeEstimate | null = null;
  for (const s of Object.values(measured.seasons)) {
    const d = s?.decayAfterSchool ?? null;
    if (
      d &&
      (!best ||
        rank[d.confidence] > rank[best.confidence] ||
        (rank[d.confidence] === rank[best.confidence] && d.events > best.events))
    )
      best = d;
  }
  return best;
}

/** Fits and stores a new calibration version for the room (the previous one is superseded). */
export async function calibrate(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  roomId: string,
): Promise<CalibrationVersion> {
  const room = await readEngineRoom(db, trust.id, trust.schoolIds, roomId);
  if (!room) throw notFound('That room');
  if (!room.measured)
    throw badRequest(
      'This room has no analysed readings yet. Import its monitor log (and wait for the analysis) first.',
    );
  const stored = await getCurrentAssumptionSet(db, trust.id);
  const measured = room.measured;
  const targets = Object.fromEntries(
    Object.values(measured.seasons)
      .filter((s) => s !== undefined && s.occupiedMeanPpm !== null)
      .map((s) => [
        s!.season,
        { occupiedMeanPpm: s!.occupiedMeanPpm as number, baselinePpm: s!.baseline.ppm, days: s!.days },
      ]),
  );
  return db.transaction().execute(async (trx) => {
    const last = await trx
      .selectFrom('room_calibrations')
      .select((eb) => eb.fn.max('version').as('v'))
      .where('room_id', '=', roomId)
      .executeTakeFirst();
    const version = Number(last?.v ?? 0) + 1;
    const fit = calibrateRoom({
      input: room.input,
      assumptions: stored.set,
      targets,
      afterSchoolDecay: bestAfterSchoolDecay(measured),
      label: (days) => `calibrated from ${days} days of readings (version ${version})`,
    });
    if (!fit)
      throw badRequest(
        'Calibration needs at least 5 school days with readings in one season. Import more of this room’s log first.',
      );
    await trx
      .updateTable('room_calibrations')
      .set({ status: 'superseded', ended_at: new Date(), ended_by_email: actor.actorEmail })
      .where('room_id', '=', roomId)
      .where('status', '=', 'active')
      .execute();
    const row = await trx
      .insertInto('room_calibrations')
      .values({
        trust_id: trust.id,
        room_id: roomId,
        version,
        days_used: fit.daysUsed,
        label: fit.calibration.label,
        calibration: JSON.stringify(fit.calibration),
        fit: JSON.stringify(fit),
        assumptions_version: stored.label,
        created_by_email: actor.actorEmail,
      })
      .returning(['id', 'created_at'])
      .executeTakeFirstOrThrow();
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'room.calibrated',
      entityType: 'room',
      entityId: roomId,
      summary: `Room ${room.roomCode} ${fit.calibration.label}`,
      after: fit.calibration,
    });
    return {
      id: row.id,
      version,
      status: 'active',
      label: fit.calibration.label,
      daysUsed: fit.daysUsed,
      fit,
      assumptionsVersion: stored.label,
      createdAt: new Date(row.created_at).toISOString(),
      createdByEmail: actor.actorEmail,
      endedAt: null,
      endedByEmail: null,
    };
  });
}

/** Reverts the room to its uncalibrated model (the version stays in the history). */
export async function revertCalibration(
  db: Kysely<Database>,
  trust: ActiveTrust,
  actor: Actor,
  roomId: string,
): Promise<void> {
  const room = await readEngineRoom(db, trust.id, trust.schoolIds, roomId);
  if (!room) throw notFound('That room');
  await db.transaction().execute(async (trx) => {
    const active = await trx
      .updateTable('room_calibrations')
      .set({ status: 'reverted', ended_at: new Date(), ended_by_email: actor.actorEmail })
      .where('room_id', '=', roomId)
      .where('status', '=', 'active')
      .returning(['version', 'label'])
      .executeTakeFirst();
    if (!active) throw conflict('This room has no active calibration to revert.');
    await recordAudit(trx, {
      trustId: trust.id,
      ...actor,
      action: 'room.calibration_reverted',
      entityType: 'room',
      entityId: roomId,
      summary: `Room ${room.roomCode}: reverted calibration version ${active.version} (${active.label}); the model uses the register's defaults again`,
    });
  });
}
