/** Assess one room under an assumption set: the engine's one entry point. */
import type { AssessOptions, AssumptionSet, RoomAssessment, RoomAssessmentInput } from './types';

/** Cautions every result carries. */
export const ENGINE_CAUTIONS: readonly string[] = [
  'Screening estimates for prioritising, not a design.',
  'Ventilation design and installation defer to local building regulations, school guidance and a competent, licensed engineer.',
];

/** Assess one room: CO2 per season, criteria, risk, comfort and the heat-recovery retrofit. */
export function assessRoom(input: RoomAssessmentInput, assumptions: AssumptionSet, options: AssessOptions = {}): RoomAssessment {
  void input;
  void assumptions;
  void options;
  throw new Error('assessRoom: not implemented yet');
}
