/**
 * Airtally assessment engine: the public entry points. Pure functions, plain data in and out.
 * Results are screening estimates for prioritising, not a design.
 */
export { assessRoom, ENGINE_CAUTIONS } from './assess';
export { rankRooms, toRankInput, DEFAULT_RANK_WEIGHTS } from './ranking';
export { DEFAULT_ASSUMPTIONS } from './assumptions';
export { listAssumptions, withAssumptionValue, validateAssumptionSet } from './assumption-tools';
export type { AssumptionEntry } from './assumption-tools';
export { EngineInputError } from './errors';
export { RISK_BAND_LABELS } from './risk';
export type * from './types';
