/**
 * Measured CO2 from classroom monitor logs: per-season analysis (occupied-period statistics, outdoor baseline,
 * decay and build-up air-change rates with confidences), calibration of the model, measured evidence in the
 * risk, and the comparison of measurement with prediction. Pure: plain data in and out.
 */
export * from './types';
export { analyseRoom, measuredThresholds, MIN_DAYS_FOR_MEASURED_RISK, REFERENCE_THRESHOLDS_PPM } from './analyse-room';
export {
  calibrateRoom,
  MIN_DAYS_TO_CALIBRATE,
  type CalibrationFit,
  type CalibrationTarget,
  type SeasonFit,
} from './calibrate';
export { applyMeasuredEvidence, type EvidenceSummary } from './evidence';
export {
  compareWithModel,
  DEFAULT_MARGIN_PPM,
  MIN_DAYS_TO_COMPARE,
  worstMeasuredSeasonMean,
  type RoomComparison,
  type SeasonComparison,
} from './compare';
export { fitDecayLogLinear, findDecays, DECAY_RULES } from './decay';
export { fitBuildUp, riseRatePpmPerH } from './build-up';
export { outdoorBaseline } from './baseline';
export { measureDay, occupiedWindow } from './day-measure';
