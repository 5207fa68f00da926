import { type Kysely, sql } from 'kysely';
import type { Database } from '../../../../db/database';
import {
  assessRoom,
  EngineInputError,
  type AssumptionSet,
  type RoomAssessment,
  type RoomAssessmentInput,
} from '../../engine';
import type { MeasuredEvidenceInput } from '../../engine/measured';
import type { ActiveTrust } from '../auth/context';
import { badRequest, notFound } from '../http/errors';
import { assessWithEvidence } from '../monitor-logs/evidence.repository';
import { getRoomRank } from '../portfolio/ranking.repository';
import type { WhatIfBody } from './assessments.schemas';
import { getAssumptionSetById, getCurrentAssumptionSet } from './assumptions.repository';
import { chunkInputsOf } from './chunks.repository';
import { readEngineRoom } from './engine-input.repository';
import { decodeRoom, inputsKey, type SnapshotRoom } from './input-snapshot';
import { toResultRow, type ResultRow } from './result-row';

/** The room's place in the latest current results, if it has been assessed. */
export interface LatestResult {
  runId: string;
  rank: number | null;
  rankedRooms: number;
  finishedAt: string | null;
  assumptionsVersion: string | null;
}

/**
 * Where a room's figures come from: the latest run's (recomputed from the inputs it kept, with its assumption set),
 * or the register and assumptions as they are now, when the room has no run yet or something changed since (named).
 */
export interface RoomBasis {
  source: 'run' | 'now';
  changedSince: ('register' | 'assumptions')[];
}

/** A room assessed (with curves) as the room page shows it, plus its latest stored result. */
export interface RoomAssessmentView {
  assessment: RoomAssessment;
  assumptionsLabel: string;
  latest: LatestResult | null;
  basis: RoomBasis;
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

interface CurrentRun {
  runId: string;
  assumptionSetId: string | null;
  assumptionsVersion: string | null;
  finishedAt: Date | null;
}

/** The run of the room's current result, if it has one. */
async function currentRunOf(db: Kysely<Database>, trustId: string, roomId: string): Promise<CurrentRun | null> {
  const { rows } = await sql<{
    run_id: string;
    assumption_set_id: string | null;
    assumptions_version: string | null;
    finished_at: Date | null;
  }>`
    SELECT ac.run_id, ar.assumption_set_id, ar.assumptions_version, ar.finished_at
    FROM rooms r
      JOIN assessment_current ac ON ac.school_id = r.school_id AND ac.trust_id = ${trustId}
      JOIN room_results rr ON rr.run_id = ac.run_id AND rr.room_id = r.id
      JOIN assessment_runs ar ON ar.id = ac.run_id
    WHERE r.id = ${roomId}::uuid`.execute(db);
  const r = rows[0];
  return r
    ? {
        runId: r.run_id,
        assumptionSetId: r.assumption_set_id,
        assumptionsVersion: r.assumptions_version,
        finishedAt: r.finished_at,
      }
    : null;
}

/** The room as a run assessed it: its kept inputs and the run's assumption set (null when the run kept none). */
async function asTheRunSawIt(
  db: Kysely<Database>,
  trustId: string,
  run: { runId: string; assumptionSetId: string | null },
  roomId: string,
): Promise<{ room: SnapshotRoom; set: AssumptionSet; label: string } | null> {
  const [inputs, stored] = await Promise.all([
    chunkInputsOf(db, run.runId, roomId),
    run.assumptionSetId ? getAssumptionSetById(db, trustId, run.assumptionSetId) : null,
  ]);
  const room = inputs ? decodeRoom(inputs, roomId) : null;
  return room && stored ? { room, set: stored.set, label: stored.label } : null;
}

/**
 * What the room page and the what-if start from: the latest run's inputs and assumptions when the register and the
 * trust's assumptions are as that run saw them (the page then shows exactly the run's figures), else the room as it
 * is now under the current assumptions, saying what changed. Null when the room is not in the member's scope.
 */
async function roomBasis(
  db: Kysely<Database>,
  trust: ActiveTrust,
  roomId: string,
): Promise<{
  room: { input: RoomAssessmentInput; measured?: MeasuredEvidenceInput | null };
  set: AssumptionSet;
  label: string;
  run: CurrentRun | null;
  basis: RoomBasis;
} | null> {
  const now = await readEngineRoom(db, trust.id, trust.schoolIds, roomId);
  if (!now) return null;
  const [current, run] = await Promise.all([getCurrentAssumptionSet(db, trust.id), currentRunOf(db, trust.id, roomId)]);
  const seen = run ? await asTheRunSawIt(db, trust.id, run, roomId) : null;
  if (!run || !seen)
    return { room: now, set: current.set, label: current.label, run, basis: { source: 'now', changedSince: [] } };
  const changedSince: RoomBasis['changedSince'] = [];
  if (inputsKey(seen.room) !== inputsKey(now)) changedSince.push('register');
  if (run.assumptionSetId !== current.id) changedSince.push('assumptions');
  if (changedSince.length === 0)
    return { room: seen.room, set: seen.set, label: seen.label, run, basis: { source: 'run', changedSince } };
  return { room: now, set: current.set, label: current.label, run, basis: { source: 'now', changedSince } };
}

/** The room's latest stored result with its rank from the one ranking (the same as every page and export). */
async function latestResult(
  db: Kysely<Database>,
  trustId: string,
  roomId: string,
  run: CurrentRun | null,
): Promise<LatestResult | null> {
  if (!run) return null;
  const place = await getRoomRank(db, trustId, roomId);
  return {
    runId: run.runId,
    rank: place?.rank ?? null,
    rankedRooms: place?.rankedRooms ?? 0,
    finishedAt: run.finishedAt?.toISOString() ?? null,
    assumptionsVersion: run.assumptionsVersion,
  };
}

/**
 * The room page's assessment: the latest run's figures, recomputed from what it kept, when nothing has changed since;
 * otherwise the room as the register holds it now. Null when the room is not in scope.
 */
export async function getRoomAssessment(
  db: Kysely<Database>,
  trust: ActiveTrust,
  roomId: string,
): Promise<RoomAssessmentView | null> {
  const start = await roomBasis(db, trust, roomId);
  if (!start) return null;
  const assessment = explainEngineErrors(() => assessWithEvidence(start.room, start.set, { withCurve: true }));
  return {
    assessment,
    assumptionsLabel: start.label,
    latest: await latestResult(db, trust.id, roomId, start.run),
    basis: start.basis,
  };
}

/** A room of a run as the run assessed it, and the result row it stored. */
export interface RunRoomDetail {
  runId: string;
  assumptionsLabel: string;
  /** The register values, calibration and measured evidence the run read. */
  input: RoomAssessmentInput;
  /** The assessment recomputed from them with the run's assumption set (with curves). */
  assessment: RoomAssessment;
  /** The stored row's figures recomputed from that assessment (equal to the stored row: the engine is deterministic). */
  row: Omit<ResultRow, 'runId'>;
}

/**
 * A room of one of the trust's runs, recomputed from the inputs the run kept with the assumption set it used. 404 when
 * the run or room is not the member's, or the run's results were pruned.
 */
export async function getRunRoomDetail(
  db: Kysely<Database>,
  trust: ActiveTrust,
  runId: string,
  roomId: string,
): Promise<RunRoomDetail> {
  const run = await db
    .selectFrom('assessment_runs')
    .select(['id', 'assumption_set_id', 'school_id'])
    .where('id', '=', runId)
    .where('trust_id', '=', trust.id)
    .where('status', '=', 'succeeded')
    .where('results_pruned_at', 'is', null)
    .executeTakeFirst();
  if (!run) throw notFound('That assessment run');
  const seen = await asTheRunSawIt(db, trust.id, { runId, assumptionSetId: run.assumption_set_id }, roomId);
  if (!seen || (trust.schoolIds !== null && !trust.schoolIds.includes(seen.room.schoolId)))
    throw notFound('That room in this run');
  const assessment = explainEngineErrors(() => assessWithEvidence(seen.room, seen.set, { withCurve: true }));
  const { runId: _, ...row } = toResultRow(runId, seen.room, assessment);
  return { runId, assumptionsLabel: seen.label, input: seen.room.input, assessment, row };
}

/** The answer of a what-if: the room as the page shows it and with the changes. Nothing is saved. */
export interface WhatIfAnswer {
  current: RoomAssessment;
  whatIf: RoomAssessment;
  changes: string[];
}

/**
 * Re-assesses the room with more or fewer pupils, a different openable window area, or heat-recovery units
 * added from the catalogue (the room is then judged as mechanically ventilated with the units' supply on top of
 * any it has), starting from what the room page shows (roomBasis). Reads only; writes nothing.
 */
export async function whatIf(
  db: Kysely<Database>,
  trust: ActiveTrust,
  roomId: string,
  body: WhatIfBody,
): Promise<WhatIfAnswer> {
  const start = await roomBasis(db, trust, roomId);
  if (!start) throw notFound('That room');
  const { room, set } = start;
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
  const assess = (input: RoomAssessmentInput) => explainEngineErrors(() => assessRoom(input, set, { withCurve: true }));
  return { current: assess(room.input), whatIf: assess(changed), changes };
}
