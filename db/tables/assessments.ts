/** Tables of the assumption sets, unit catalogue, assessment runs and room results feature (owned by that feature; add table interfaces here). */
export interface AssessmentsTables {}
