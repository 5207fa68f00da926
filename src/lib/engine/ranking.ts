/**
 * THE ranking rule, the one implementation every page and export uses (the server stores its output in
 * portfolio_ranks). Rooms are ranked by user-weighted, normalised risk, cost-effectiveness and payback:
 * each part is divided by the best value among the rows (payback: shortest ÷ own), so the best room on a part
 * scores 1 and a room without that figure scores 0; the score is the weighted sum over the sum of the weights;
 * ties go to more pupil-hours above the threshold, then to the smaller room id. An Airtally rule (common practice
 * of weighted scoring; no published source).
 */
import { EngineInputError } from './errors';
import { formatInt, formatOneDecimal } from './format';
import { RISK_BAND_LABELS } from './risk';
import type { RankedRow, RankInput, RankWeights, RoomAssessment } from './types';

/** Weights used when the user has not chosen any. */
export const DEFAULT_RANK_WEIGHTS: RankWeights = { risk: 0.6, costEffectiveness: 0.3, payback: 0.1 };

/** The few numbers ranking needs from an assessment. */
export function toRankInput(roomId: string, assessment: RoomAssessment): RankInput {
  const r = assessment.appraisal;
  const has = r?.feasible === true && r.recommended;
  return {
    roomId,
    roomCode: assessment.roomCode,
    pupils: assessment.pupils,
    riskScore: assessment.risk.score,
    riskBand: assessment.risk.band,
    pupilHoursPerYearAbove: assessment.risk.pupilHoursPerYearAbove,
    thresholdPpm: assessment.risk.thresholdPpm,
    criteriaMet: assessment.criteriaMet,
    hasRetrofit: has,
    pupilHoursRemovedPer1000Gbp: has ? r.pupilHoursRemovedPer1000Gbp : null,
    simplePaybackYears: has ? (r.baselines[r.headline]?.simplePaybackYears ?? null) : null,
    capitalCostGbp: has ? r.capitalCostGbp : null,
  };
}

function checkWeights(w: RankWeights): void {
  for (const key of ['risk', 'costEffectiveness', 'payback'] as const) {
    const v = w[key];
    if (typeof v !== 'number' || !Number.isFinite(v) || v < 0)
      throw new EngineInputError(`weights.${key}`, `must be a number of zero or more, got ${String(v)}`);
  }
  if (w.risk + w.costEffectiveness + w.payback <= 0)
    throw new EngineInputError('weights', 'at least one weight must be above zero');
}

function ordinal(n: number): string {
  const s = n % 100;
  if (s >= 11 && s <= 13) return `${n}th`;
  return `${n}${n % 10 === 1 ? 'st' : n % 10 === 2 ? 'nd' : n % 10 === 3 ? 'rd' : 'th'}`;
}

/** The stored parts of a room that decide its rank. */
export interface RankParts {
  roomId: string;
  riskScore: number;
  pupilHoursPerYearAbove: number;
  pupilHoursRemovedPer1000Gbp: number | null;
  simplePaybackYears: number | null;
}

/** A room's place: rank (1 = do first), weighted score 0–1 and its three normalised parts. */
export interface RankPlace<T extends RankParts = RankParts> {
  row: T;
  rank: number;
  score: number;
  parts: { risk: number; costEffectiveness: number; payback: number };
}

/** The ranking rule (see the file comment): rows in rank order with their scores and parts. */
export function rankOrder<T extends RankParts>(rows: readonly T[], weights: RankWeights): RankPlace<T>[] {
  checkWeights(weights);
  const wSum = weights.risk + weights.costEffectiveness + weights.payback;
  let maxRisk = 0;
  let maxCe = 0;
  let minPayback = Number.POSITIVE_INFINITY;
  for (const r of rows) {
    if (r.riskScore > maxRisk) maxRisk = r.riskScore;
    if (r.pupilHoursRemovedPer1000Gbp !== null && r.pupilHoursRemovedPer1000Gbp > maxCe)
      maxCe = r.pupilHoursRemovedPer1000Gbp;
    if (r.simplePaybackYears !== null && r.simplePaybackYears < minPayback) minPayback = r.simplePaybackYears;
  }
  const scored: RankPlace<T>[] = rows.map((r) => {
    const risk = maxRisk > 0 ? r.riskScore / maxRisk : 0;
    const costEffectiveness =
      maxCe > 0 && r.pupilHoursRemovedPer1000Gbp !== null ? r.pupilHoursRemovedPer1000Gbp / maxCe : 0;
    const payback =
      r.simplePaybackYears === null
        ? 0
        : r.simplePaybackYears <= 0
          ? 1
          : Number.isFinite(minPayback)
            ? Math.min(1, minPayback / r.simplePaybackYears)
            : 0;
    const score =
      (weights.risk * risk + weights.costEffectiveness * costEffectiveness + weights.payback * payback) / wSum;
    return { row: r, rank: 0, parts: { risk, costEffectiveness, payback }, score };
  });
  scored.sort(
    (a, b) =>
      b.score - a.score ||
      b.row.pupilHoursPerYearAbove - a.row.pupilHoursPerYearAbove ||
      (a.row.roomId < b.row.roomId ? -1 : a.row.roomId > b.row.roomId ? 1 : 0),
  );
  for (let i = 0; i < scored.length; i++) (scored[i] as RankPlace<T>).rank = i + 1;
  return scored;
}

/** Rank rooms with a plain-language reason for each place (the same rule as rankOrder). */
export function rankRooms(rows: readonly RankInput[], weights: RankWeights): RankedRow[] {
  const scored = rankOrder(rows, weights);
  const n = scored.length;
  const heaviest =
    weights.risk >= weights.costEffectiveness && weights.risk >= weights.payback
      ? 'risk'
      : weights.costEffectiveness >= weights.payback
        ? 'value for money'
        : 'payback';
  return scored.map((s, i) => ({
    ...s.row,
    rank: i + 1,
    score: s.score,
    parts: s.parts,
    rankReason: reasonFor(s.row, i + 1, n, heaviest),
  }));
}

function reasonFor(r: RankInput, rank: number, n: number, heaviest: string): string {
  const exposure =
    r.pupilHoursPerYearAbove >= 1
      ? `${RISK_BAND_LABELS[r.riskBand].toLowerCase()}: about ${formatInt(r.pupilHoursPerYearAbove)} pupil-hours a year above ${formatInt(r.thresholdPpm)} ppm`
      : `${RISK_BAND_LABELS[r.riskBand].toLowerCase()}: no pupil-hours above ${formatInt(r.thresholdPpm)} ppm`;
  let retrofit: string;
  if (!r.hasRetrofit) retrofit = r.criteriaMet ? 'no units needed' : 'no catalogue units recommended';
  else {
    const ce =
      r.pupilHoursRemovedPer1000Gbp === null
        ? ''
        : `${formatInt(r.pupilHoursRemovedPer1000Gbp)} pupil-hours of poor air removed per £1,000`;
    const pb = r.simplePaybackYears === null ? 'no payback' : `payback ${formatOneDecimal(r.simplePaybackYears)} years`;
    retrofit = ce ? `${ce}, ${pb}` : pb;
  }
  return `${ordinal(rank)} of ${n}: ${exposure}; ${retrofit} (weighted most on ${heaviest}).`;
}
