import type { RoomAssessment } from '../../engine';
import { riskBandNumber } from '../../engine/risk';
import { label } from '../../engine/vocabulary';
import type { EngineRoom } from './engine-input.repository';

/**
 * A room_results row: numbers and codes only. Money columns are against the headline baseline (`baseline`); ranks live
 * in portfolio_ranks; the detail is recomputed from the chunk's input snapshot.
 */
export interface ResultRow {
  runId: string;
  roomId: string;
  schoolId: string;
  blockId: string | null;
  ventilationType: string;
  pupils: number;
  worstSeason: string;
  meanCo2Ppm: number;
  peakCo2Ppm: number;
  criteriaMet: boolean;
  riskBand: number;
  riskScore: number;
  pupilHoursAbove: number;
  reason: string;
  unitsRecommended: string;
  unitCount: number;
  capitalCostGbp: number | null;
  annualSavingGbp: number | null;
  annualSavingKwh: number | null;
  annualSavingKgCo2e: number | null;
  simplePaybackYears: number | null;
  discountedPaybackYears: number | null;
  npvGbp: number | null;
  pupilHoursRemovedPer1000Gbp: number | null;
  capitalPerTonneCo2eGbp: number | null;
  baseline: string | null;
  verdict: string | null;
  annualHeatingSavingKwh: number | null;
  annualFanSavingKwh: number | null;
  annualMaintenanceSavingGbp: number | null;
  replacementCostGbp: number | null;
  pupilHoursRemoved: number | null;
  heatingFuel: string;
  fuelPriceGbpPerKwh: number;
  heatingEfficiency: number;
  priceSource: string;
  efficiencySource: string;
  heatingDegreeHoursKh: number;
  unitRunHours: number;
  assumedCount: number;
  /** The recommended units' full installed cost and life, and their lines as JSON [[count, model name], …]. */
  installedCostGbp: number | null;
  lifeYears: number | null;
  unitLines: string | null;
  /** What the risk rests on: measured readings, the calibrated model, or the prediction. */
  riskEvidence: 'measured' | 'calibrated' | 'predicted';
}

/**
 * "2 × Wall unit 150 + 1 × Sill unit 60" for a room that fails its criterion and gets units; empty for a room that
 * meets it (none needed); "None: <why>" for a room that fails it without units (room type, no pupils, no model).
 */
export function describeUnits(assessment: RoomAssessment, use: string | null = null): string {
  if (assessment.criteriaMet) return '';
  const a = assessment.appraisal;
  if (!a) {
    if (!assessment.isTeachingRoom)
      return `None: ${use ? `${label(use).toLowerCase()} rooms are` : 'this room type is'} not sized for units (not a teaching room)`;
    return 'None: no pupils recorded, so no flow to size units for';
  }
  if (!a.feasible)
    return `None: no catalogue model reaches ${Math.round(a.requiredSupplyLps)} l/s within the most units a room takes`;
  return a.unitModels;
}

/** What a result row needs of the room beyond its assessment. */
type RoomIds = Pick<EngineRoom, 'roomId' | 'schoolId' | 'blockId' | 'input'>;

/** One assessed room as a result row: the worst season's CO2, the risk, and the headline appraisal per room. */
export function toResultRow(runId: string, room: RoomIds, assessment: RoomAssessment): ResultRow {
  const worst = assessment.seasons[assessment.worstSeason];
  // Columns carry recommended units only; every appraisal stays in the detail (room page, optimiser).
  const appraisal = assessment.appraisal?.feasible && assessment.appraisal.recommended ? assessment.appraisal : null;
  const head = appraisal ? appraisal.baselines[appraisal.headline] : null;
  return {
    runId,
    roomId: room.roomId,
    schoolId: room.schoolId,
    blockId: room.blockId,
    ventilationType: room.input.room.ventilationType ?? 'natural_single_sided',
    pupils: assessment.pupils,
    worstSeason: assessment.worstSeason,
    meanCo2Ppm: worst.occupiedMeanCo2Ppm,
    peakCo2Ppm: worst.peakCo2Ppm,
    criteriaMet: assessment.criteriaMet,
    riskBand: riskBandNumber(assessment.risk.band),
    riskScore: assessment.risk.score,
    pupilHoursAbove: assessment.risk.pupilHoursPerYearAbove,
    reason: assessment.risk.reason,
    unitsRecommended: describeUnits(assessment, room.input.room.use ?? null),
    unitCount: appraisal?.unitCount ?? 0,
    capitalCostGbp: head?.capitalCostGbp ?? null,
    annualSavingGbp: head?.annualNetSavingGbp ?? null,
    annualSavingKwh: head?.annualNetSavingKwh ?? null,
    annualSavingKgCo2e: head?.annualNetSavingKgCo2e ?? null,
    simplePaybackYears: head?.simplePaybackYears ?? null,
    discountedPaybackYears: head?.discountedPaybackYears ?? null,
    npvGbp: head?.npvGbp ?? null,
    pupilHoursRemovedPer1000Gbp: appraisal?.pupilHoursRemovedPer1000Gbp ?? null,
    capitalPerTonneCo2eGbp: appraisal?.capitalPerTonneCo2eGbp ?? null,
    baseline: appraisal?.headline ?? null,
    verdict: head?.verdict ?? null,
    annualHeatingSavingKwh: head?.annual.heatingKwh ?? null,
    annualFanSavingKwh: head?.annual.fanKwh ?? null,
    annualMaintenanceSavingGbp: head?.annual.maintenanceGbp ?? null,
    replacementCostGbp: head ? head.replacements.reduce((sum, r) => sum + r.costGbp, 0) : null,
    pupilHoursRemoved: appraisal?.pupilHoursRemovedPerYear ?? null,
    heatingFuel: assessment.heating.fuel,
    fuelPriceGbpPerKwh: assessment.heating.priceGbpPerKwh,
    heatingEfficiency: assessment.heating.efficiency,
    priceSource: assessment.heating.priceSource,
    efficiencySource: assessment.heating.efficiencySource,
    heatingDegreeHoursKh: assessment.hours.heatingDegreeHoursKh,
    unitRunHours: assessment.hours.unitRunHoursPerYear,
    assumedCount: assessment.assumed.length,
    riskEvidence: assessment.evidence?.kind ?? 'predicted',
    installedCostGbp: appraisal?.capitalCostGbp ?? null,
    lifeYears: appraisal?.lifeYears ?? null,
    unitLines: appraisal ? JSON.stringify(appraisal.units.map((u) => [u.count, u.modelName])) : null,
  };
}
