/**
 * Airtally assessment engine: the public entry points. Pure functions, plain data in and out.
 * Results are screening estimates for prioritising, not a design.
 */
export { assessRoom, ENGINE_CAUTIONS } from './assess';
export { rankRooms, rankOrder, toRankInput, DEFAULT_RANK_WEIGHTS } from './ranking';
export type { RankParts, RankPlace } from './ranking';
export { DEFAULT_ASSUMPTIONS } from './assumptions';
export {
  listAssumptions,
  withAssumptionValue,
  validateAssumptionSet,
  completeAssumptionSet,
  UNIT_MODEL_FIELD_KIND,
} from './assumption-tools';
export type { AssumptionEntry } from './assumption-tools';
export { EngineInputError } from './errors';
export * as limits from './limits';
export * as hours from './hours';
export { RISK_BAND_LABELS } from './risk';
export type * from './types';

// Formula modules, exported for reports, the what-if panel and tests.
export * as co2 from './co2-mass-balance';
export * as windows from './window-airflow';
export * as infiltration from './infiltration';
export * as energy from './energy';
export * as finance from './finance';
export * as comfort from './comfort';
export * as calibration from './calibration';
export { CRITERIA_PACKS, applyPack, en16798DesignAirflowLps } from './criteria';
export { CLIMATE_REGION_DATA } from './climate-regions';
