import { type Kysely, sql } from 'kysely';
import type { Database } from '../../../../db/database';
import {
  assessRoom,
  EngineInputError,
  type AssumptionSet,
  type RoomAssessment,
  type RoomAssessmentInput,
} from '../../engine';
import type { ActiveTrust } from '../auth/context';
import { badRequest, notFound } from '../http/errors';
import { getCurrentAssumptionSet } from './assumptions.repository';
import type { WhatIfBody } from './assessments.schemas';
import { assessWithEvidence } from '../monitor-logs/evidence.repository';
import { readEngineRoom } from './engine-input.repository';
import { getRoomRank } from '../portfolio/ranking.repository';

/** The room's place in the latest current results, if it has been assessed. */
export interface LatestResult {
  runId: string;
  rank: number | null;
  rankedRooms: number;
  finishedAt: string | null;
  assumptionsVersion: string | null;
}

/** A room assessed now (with curves) under the trust's current assumptions, plus its latest stored result. */
export interface RoomAssessmentView {
  assessment: RoomAssessment;
  assumptionsLabel: string;
  latest: LatestResult | null;
}

function assessOrExplain(input: RoomAssessmentInput, set: AssumptionSet): RoomAssessment {
  return explainEngineErrors(() => assessRoom(input, set, { withCurve: true }));
}

/** Runs an assessment, turning the engine's input errors into a 400 a person can act on. */
function explainEngineErrors<T>(assess: () => T): T {
  try {
    return assess();
  } catch (error) {
    if (error instanceof EngineInputError)
      throw badRequest(`This room cannot be assessed: ${error.message}`, { field: error.field });
    throw error;
  }
}

/** The room's latest stored result with its rank from the one ranking (the same as every page and export). */
async function latestResult(db: Kysely<Database>, trustId: string, roomId: string): Promise<LatestResult | null> {
  const { rows } = await sql<{ run_id: string; finished_at: Date | null; assumptions_version: string | null }>`
    SELECT rr.run_id, ar.finished_at, ar.assumptions_version
    FROM room_results rr JOIN assessment_runs ar ON ar.id = rr.run_id
    WHERE rr.room_id = ${roomId}::uuid AND rr.trust_id = ${trustId} AND rr.is_current`.execute(db);
  const r = rows[0];
  if (!r) return null;
  const place = await getRoomRank(db, trustId, roomId);
  return {
    runId: r.run_id,
    rank: place?.rank ?? null,
    rankedRooms: place?.rankedRooms ?? 0,
    finishedAt: r.finished_at?.toISOString() ?? null,
    assumptionsVersion: r.assumptions_version,
  };
}

/** The room page's assessment: computed now, so it reflects the register as it is; null when the room is not in scope. */
export async function getRoomAssessment(
  db: Kysely<Database>,
  trust: ActiveTrust,
  roomId: string,
): Promise<RoomAssessmentView | null> {
  const room = await readEngineRoom(db, trust.id, trust.schoolIds, roomId);
  if (!room) return null;
  const stored = await getCurrentAssumptionSet(db, trust.id);
  const assessment = explainEngineErrors(() => assessWithEvidence(room, stored.set, { withCurve: true }));
  return {
    assessment,
    assumptionsLabel: stored.label,
    latest: await latestResult(db, trust.id, roomId),
  };
}

/** The answer of a what-if: the room today and with the changes, both under the current assumptions. Nothing is saved. */
export interface WhatIfAnswer {
  current: RoomAssessment;
  whatIf: RoomAssessment;
  changes: string[];
}

/**
 * Re-assesses the room with more or fewer pupils, a different openable window area, or heat-recovery units
 * added from the catalogue (the room is then judged as mechanically ventilated with the units' supply on top of
 * any it has). Reads only; writes nothing.
 */
export async function whatIf(
  db: Kysely<Database>,
  trust: ActiveTrust,
  roomId: string,
  body: WhatIfBody,
): Promise<WhatIfAnswer> {
  const room = await readEngineRoom(db, trust.id, trust.schoolIds, roomId);
  if (!room) throw notFound('That room');
  const { set } = await getCurrentAssumptionSet(db, trust.id);
  const changed: RoomAssessmentInput = structuredClone(room.input);
  const changes: string[] = [];
  if (body.pupils !== undefined) {
    changes.push(`Pupils ${room.input.room.pupils} → ${body.pupils}`);
    changed.room.pupils = body.pupils;
  }
  if (body.openableAreaM2 !== undefined) {
    if (changed.room.glazingAreaM2 !== null && body.openableAreaM2 > changed.room.glazingAreaM2) {
      throw badRequest(`Openable area cannot exceed the glazing area (${changed.room.glazingAreaM2} m²).`, {
        field: 'openableAreaM2',
      });
    }
    changes.push(`Openable window area ${room.input.room.openableAreaM2} m² → ${body.openableAreaM2} m²`);
    changed.room.openableAreaM2 = body.openableAreaM2;
  }
  if (body.addUnits && body.addUnits.length > 0) {
    const catalogue = set.retrofit.unitCatalogue.value;
    let addedLps = 0;
    for (const line of body.addUnits) {
      const model = catalogue.find((m) => m.id === line.modelId);
      if (!model)
        throw badRequest(`There is no unit model "${line.modelId}" in the trust's catalogue.`, {
          field: 'addUnits.modelId',
        });
      addedLps += model.nominalFlowLps * line.count;
      changes.push(`Add ${line.count} × ${model.name} (${model.nominalFlowLps * line.count} l/s)`);
    }
    const mechanical =
      set.mechanical.ventilationClass.value[room.input.room.ventilationType ?? 'natural_single_sided'] === 'mechanical';
    const existingLps = mechanical ? (room.input.room.mechanicalSupplyLps ?? 0) : 0;
    changed.room.ventilationType = 'heat_recovery_unit';
    changed.room.mechanicalSupplyLps = existingLps + addedLps;
  }
  return { current: assessOrExplain(room.input, set), whatIf: assessOrExplain(changed, set), changes };
}
