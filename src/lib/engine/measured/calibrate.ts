/**
 * Calibration: fit a room's effective window use (per measured season) and its infiltration so that the model
 * reproduces the measured season. Infiltration comes from after-school decays when they are trustworthy
 * (windows assumed shut after school, so the decay is infiltration alone: Batterman 2017 observed evening rates
 * near 0.1 h⁻¹ with ventilation off). Each season's window factor k is then found by bisection so that the
 * model's occupied-period mean above outdoor air equals the measured one (comparing rises above each side's own
 * outdoor level keeps a sensor's calibration offset out of the fit). The model's mean falls as k grows, so
 * the root is unique; when even shut or fully open windows cannot reach the measurement, k stops at that
 * limit and the gap is reported. An Airtally screening method; the fitted values stand in for how the room is
 * really used, including fewer pupils than the register says.
 */
import { assessRoom } from '../assess';
import type { AssumptionSet, RoomAssessmentInput, RoomCalibration, Season } from '../types';
import type { AirChangeEstimate } from './types';

/** A season's measured target. */
export interface CalibrationTarget {
  occupiedMeanPpm: number;
  baselinePpm: number;
  days: number;
}

/** How one season was fitted. */
export interface SeasonFit {
  days: number;
  measuredRisePpm: number;
  modelRiseBeforePpm: number;
  modelRiseAfterPpm: number;
  windowUseFactor: number;
  /** Where the fit stopped short: windows already shut, fully open, or the room has no openable windows. */
  limit: 'none' | 'windows_shut' | 'windows_fully_open' | 'no_windows';
}

/** What a calibration fits, with the evidence behind it. */
export interface CalibrationFit {
  calibration: RoomCalibration;
  daysUsed: number;
  seasons: Partial<Record<Season, SeasonFit>>;
  infiltration: { beforeLps: number; afterLps: number; source: 'after_school_decays' | 'model' };
  notes: string[];
}

/** Good days a season needs to be calibrated [CP, an Airtally rule]. */
export const MIN_DAYS_TO_CALIBRATE = 5;

function riseOf(input: RoomAssessmentInput, set: AssumptionSet, season: Season, calibration: RoomCalibration): number {
  const a = assessRoom({ ...input, calibration }, set, { withCurve: false });
  return a.seasons[season].occupiedMeanCo2Ppm - set.air.outdoorCo2Ppm.value;
}

/**
 * Fits the calibration; null when no season has enough days. `label` is given by the caller
 * ('calibrated from 42 days of readings (version 3)').
 */
export function calibrateRoom(args: {
  input: RoomAssessmentInput;
  assumptions: AssumptionSet;
  targets: Partial<Record<Season, CalibrationTarget>>;
  afterSchoolDecay: AirChangeEstimate | null;
  label: (daysUsed: number) => string;
}): CalibrationFit | null {
  const { input, assumptions: set } = args;
  const seasonsToFit = (Object.entries(args.targets) as [Season, CalibrationTarget][]).filter(
    ([, t]) => t.days >= MIN_DAYS_TO_CALIBRATE,
  );
  if (seasonsToFit.length === 0) return null;
  const uncalibrated = { ...input, calibration: null };
  const before = assessRoom(uncalibrated, set, { withCurve: false });
  const notes: string[] = [];
  const decay = args.afterSchoolDecay;
  const useDecay = decay !== null && (decay.confidence === 'high' || decay.confidence === 'medium');
  const infiltrationLps = useDecay ? decay.flowLps : null;
  if (!useDecay)
    notes.push(
      'Infiltration kept from the air permeability: no trustworthy after-school decays (medium confidence or better) were logged.',
    );

  // The room's own window assumptions (its winter observation, the default for a fanned room) as assessed.
  const windowUse = before.windows.useWithMechanical;
  const factors: Partial<Record<Season, number>> = {};
  const seasons: Partial<Record<Season, SeasonFit>> = {};
  let daysUsed = 0;
  for (const [season, target] of seasonsToFit) {
    daysUsed += target.days;
    const opening =
      Math.max(before.windows.openFractionOccupied[season], before.windows.openFractionEmpty[season]) * windowUse;
    const measuredRise = target.occupiedMeanPpm - target.baselinePpm;
    const trial = (k: number) =>
      riseOf(input, set, season, { windowUseFactor: { [season]: k }, infiltrationLps, label: '' });
    let k = 1;
    let limit: SeasonFit['limit'] = 'none';
    if (before.windows.effectiveAreaM2 <= 0 || opening <= 0) limit = 'no_windows';
    else {
      const kMax = 1 / opening;
      if (trial(0) <= measuredRise) {
        k = 0;
        limit = 'windows_shut';
      } else if (trial(kMax) >= measuredRise) {
        k = kMax;
        limit = 'windows_fully_open';
      } else {
        let lo = 0;
        let hi = kMax;
        for (let i = 0; i < 50 && hi - lo > 1e-4; i++) {
          const mid = (lo + hi) / 2;
          if (trial(mid) > measuredRise) lo = mid;
          else hi = mid;
        }
        k = (lo + hi) / 2;
      }
    }
    if (limit !== 'no_windows') factors[season] = k;
    seasons[season] = {
      days: target.days,
      measuredRisePpm: measuredRise,
      modelRiseBeforePpm: before.seasons[season].occupiedMeanCo2Ppm - set.air.outdoorCo2Ppm.value,
      modelRiseAfterPpm: 0,
      windowUseFactor: k,
      limit,
    };
    if (limit === 'windows_shut')
      notes.push(
        `${season}: even with windows shut the model stays below the measured CO2: the room may hold more people than the register says, or leak less air.`,
      );
    if (limit === 'windows_fully_open')
      notes.push(
        `${season}: even with windows fully open the model stays above the measured CO2: the room may have fewer pupils, other ventilation, or a larger openable area than the register says.`,
      );
    if (limit === 'no_windows')
      notes.push(`${season}: the register gives no openable window area, so window use cannot be fitted.`);
  }
  const calibration: RoomCalibration = { windowUseFactor: factors, infiltrationLps, label: args.label(daysUsed) };
  const after = assessRoom({ ...input, calibration }, set, { withCurve: false });
  for (const [season] of seasonsToFit) {
    const fit = seasons[season] as SeasonFit;
    fit.modelRiseAfterPpm = after.seasons[season].occupiedMeanCo2Ppm - set.air.outdoorCo2Ppm.value;
  }
  return {
    calibration,
    daysUsed,
    seasons,
    infiltration: {
      beforeLps: before.seasons.winter.ventilation.infiltrationLps,
      afterLps: after.seasons.winter.ventilation.infiltrationLps,
      source: useDecay ? 'after_school_decays' : 'model',
    },
    notes,
  };
}
