import type { RiskBand, RoomAssessment } from '../../engine';
import type { EngineRoom } from './engine-input.repository';

/** Risk bands stored as 1–4 (least to most concern) so views can sort and filter on a number. */
export const RISK_BAND_NUMBERS: Record<RiskBand, number> = { fresh: 1, stuffy: 2, stale: 3, very_stale: 4 };
export const RISK_BANDS_BY_NUMBER: readonly RiskBand[] = ['fresh', 'stuffy', 'stale', 'very_stale'];

/** A room_results row before ranking (rank and the three component scores are set when the run is flipped current). */
export interface ResultRow {
  runId: string;
  roomId: string;
  trustId: string;
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
  /** The RoomAssessment JSON (assessed without curves). */
  detailJson: string;
  /** What the risk rests on: measured readings, the calibrated model, or the prediction. */
  riskEvidence: 'measured' | 'calibrated' | 'predicted';
}

/** "2 × Wall unit 150 + 1 × Sill unit 60"; empty when no units are recommended. */
export function describeUnits(assessment: RoomAssessment): string {
  const retrofit = assessment.retrofit;
  if (!retrofit) return '';
  if (!retrofit.feasible) return `None: no catalogue combination reaches ${Math.round(retrofit.requiredSupplyLps)} l/s`;
  return retrofit.units.map((u) => `${u.count} × ${u.modelName}`).join(' + ');
}

/** One assessed room as a result row: the worst season's CO2, the risk, and the retrofit money per room. */
export function toResultRow(runId: string, room: EngineRoom, assessment: RoomAssessment): ResultRow {
  const worst = assessment.seasons[assessment.worstSeason];
  const retrofit = assessment.retrofit?.feasible ? assessment.retrofit : null;
  return {
    runId,
    roomId: room.roomId,
    trustId: room.trustId,
    schoolId: room.schoolId,
    blockId: room.blockId,
    ventilationType: room.input.room.ventilationType,
    pupils: room.input.room.pupils,
    worstSeason: assessment.worstSeason,
    meanCo2Ppm: worst.occupiedMeanCo2Ppm,
    peakCo2Ppm: worst.peakCo2Ppm,
    criteriaMet: assessment.criteriaMet,
    riskBand: RISK_BAND_NUMBERS[assessment.risk.band],
    riskScore: assessment.risk.score,
    pupilHoursAbove: assessment.risk.pupilHoursPerYearAbove,
    reason: assessment.risk.reason,
    unitsRecommended: describeUnits(assessment),
    unitCount: retrofit?.unitCount ?? 0,
    capitalCostGbp: retrofit?.capitalCostGbp ?? null,
    annualSavingGbp: retrofit?.annualNetSavingGbp ?? null,
    // Delivered energy: heating fuel saved less the fans' electricity.
    annualSavingKwh: retrofit ? retrofit.annualFuelSavedKwh - retrofit.annualFanKwh : null,
    annualSavingKgCo2e: retrofit?.annualNetSavingKgCo2e ?? null,
    simplePaybackYears: retrofit?.simplePaybackYears ?? null,
    discountedPaybackYears: retrofit?.discountedPaybackYears ?? null,
    npvGbp: retrofit?.npvGbp ?? null,
    pupilHoursRemovedPer1000Gbp: retrofit?.pupilHoursRemovedPer1000Gbp ?? null,
    capitalPerTonneCo2eGbp: retrofit?.capitalPerTonneCo2eGbp ?? null,
    riskEvidence: assessment.evidence?.kind ?? 'predicted',
    detailJson: JSON.stringify(
      room.defaultsUsed.length > 0
        ? { ...assessment, defaultsUsed: [...assessment.defaultsUsed, ...room.defaultsUsed] }
        : assessment,
    ),
  };
}
