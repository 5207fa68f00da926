/** Rank rooms by weighted, normalised risk, cost-effectiveness and payback. */
import type { RankedRow, RankInput, RankWeights, RoomAssessment } from './types';

/** Weights used when the user has not chosen any. */
export const DEFAULT_RANK_WEIGHTS: RankWeights = { risk: 0.6, costEffectiveness: 0.3, payback: 0.1 };

/** The few numbers ranking needs from an assessment. */
export function toRankInput(roomId: string, assessment: RoomAssessment): RankInput {
  void roomId;
  void assessment;
  throw new Error('toRankInput: not implemented yet');
}

/** Rank rooms, best candidate for retrofit first, each with a plain-language reason. */
export function rankRooms(rows: readonly RankInput[], weights: RankWeights): RankedRow[] {
  void rows;
  void weights;
  throw new Error('rankRooms: not implemented yet');
}
