/** Helpers the app uses to show, edit and check an assumption set. */
import { EngineInputError, requireOneOf, requireRange } from './errors';
import { AGE_GROUPS, BASELINES, ROOM_USES, SUMMER_MODES, VENTILATION_TYPES, WINDOW_TYPES } from './vocabulary';
import type { Assumed, AssumptionKind, AssumptionSet, SourceStatus, UnitModel } from './types';

/** One assumed value flattened for display, with its path for editing (e.g. 'finance.discountRate'). */
export interface AssumptionEntry {
  path: string;
  label: string;
  unit: string;
  value: unknown;
  source: string;
  status: SourceStatus;
  kind: AssumptionKind;
  flagged: boolean;
  note: string | null;
}

/**
 * Who edits each field of a catalogue unit model: flows, efficiency, fan power, life and sound are technical
 * (estates managers); installed cost and maintenance are financial (finance leads).
 */
export const UNIT_MODEL_FIELD_KIND: Record<keyof UnitModel, AssumptionKind | 'identity'> = {
  id: 'identity',
  name: 'identity',
  nominalFlowLps: 'technical',
  heatRecoveryEfficiency: 'technical',
  specificFanPowerWPerLps: 'technical',
  installedCostGbp: 'financial',
  annualMaintenanceGbp: 'financial',
  lifeYears: 'technical',
  soundDbA: 'technical',
};

const isRecord = (x: unknown): x is Record<string, unknown> =>
  typeof x === 'object' && x !== null && !Array.isArray(x);

function isAssumed(x: unknown): x is Assumed<unknown> {
  return typeof x === 'object' && x !== null && 'value' in x && 'status' in x && 'kind' in x && 'source' in x;
}

/**
 * A set stored by an earlier engine version may lack assumptions added since, or keep ones the engine no longer
 * reads. This returns the set with every missing assumption (or group) taken from `defaults` and every assumption
 * the defaults no longer have left out, and the paths it filled. Values present are kept as they are.
 */
export function completeAssumptionSet(
  set: AssumptionSet,
  defaults: AssumptionSet,
): { set: AssumptionSet; filled: string[] } {
  const filled: string[] = [];
  const merge = (
    node: Record<string, unknown>,
    base: Record<string, unknown>,
    path: string,
  ): Record<string, unknown> => {
    let out = node;
    for (const [key, here] of Object.entries(node)) {
      if (!(key in base) && (isAssumed(here) || path === '') && key !== 'version' && key !== 'dated') {
        if (out === node) out = { ...node };
        delete out[key];
      }
    }
    for (const [key, baseValue] of Object.entries(base)) {
      const here = node[key];
      const childPath = path ? `${path}.${key}` : key;
      if (here === undefined || here === null) {
        if (out === node) out = { ...node };
        out[key] = structuredClone(baseValue);
        filled.push(childPath);
      } else if (isAssumed(baseValue) && isAssumed(here) && isRecord(baseValue.value) && isRecord(here.value)) {
        // A table keyed by a vocabulary (e.g. activity by room use) gains the rows added to the vocabulary since.
        const missing = Object.keys(baseValue.value).filter((k) => !(k in (here.value as Record<string, unknown>)));
        if (missing.length > 0) {
          if (out === node) out = { ...node };
          const value = { ...(here.value as Record<string, unknown>) };
          for (const k of missing) {
            value[k] = structuredClone((baseValue.value as Record<string, unknown>)[k]);
            filled.push(`${childPath}.${k}`);
          }
          out[key] = { ...here, value };
        }
      } else if (
        !isAssumed(baseValue) &&
        typeof baseValue === 'object' &&
        baseValue !== null &&
        typeof here === 'object' &&
        !Array.isArray(here)
      ) {
        const merged = merge(here as Record<string, unknown>, baseValue as Record<string, unknown>, childPath);
        if (merged !== here) {
          if (out === node) out = { ...node };
          out[key] = merged;
        }
      }
    }
    return out;
  };
  const completed = merge(
    set as unknown as Record<string, unknown>,
    defaults as unknown as Record<string, unknown>,
    '',
  ) as unknown as AssumptionSet;
  return { set: completed, filled };
}

/** Every assumed value of the set in a flat list, in declaration order. */
export function listAssumptions(set: AssumptionSet): AssumptionEntry[] {
  const out: AssumptionEntry[] = [];
  const walk = (node: unknown, path: string): void => {
    if (isAssumed(node)) {
      out.push({
        path,
        label: node.label,
        unit: node.unit,
        value: node.value,
        source: node.source,
        status: node.status,
        kind: node.kind,
        flagged: node.flagged === true,
        note: node.note ?? null,
      });
      return;
    }
    if (typeof node === 'object' && node !== null) {
      for (const [k, v] of Object.entries(node)) walk(v, path ? `${path}.${k}` : k);
    }
  };
  const { version: _v, dated: _d, ...groups } = set;
  walk(groups, '');
  return out;
}

/**
 * A copy of the set with one value replaced and a new version. Source and status stay as they were and
 * the note records the edit. Throws EngineInputError naming the path when it does not exist.
 */
export function withAssumptionValue(
  set: AssumptionSet,
  path: string,
  value: unknown,
  newVersion: string,
): AssumptionSet {
  const copy = structuredClone(set) as AssumptionSet;
  const parts = path.split('.');
  let node: unknown = copy;
  for (const p of parts) {
    if (typeof node !== 'object' || node === null || !(p in node))
      throw new EngineInputError(`assumptions.${path}`, 'no such assumption');
    node = (node as Record<string, unknown>)[p];
  }
  if (!isAssumed(node)) throw new EngineInputError(`assumptions.${path}`, 'is a group, not a single assumption');
  (node as Assumed<unknown>).value = value;
  (node as Assumed<unknown>).note = `Edited from the default. ${node.note ?? ''}`.trim();
  copy.version = newVersion;
  return copy;
}

/** Throws EngineInputError naming the first out-of-range value of the set (path prefixed 'assumptions.'). */
export function validateAssumptionSet(set: AssumptionSet): void {
  const r = (path: string, value: number, min: number, max: number): void => {
    requireRange(`assumptions.${path}`, value, min, max);
  };
  if (typeof set.version !== 'string' || set.version === '')
    throw new EngineInputError('assumptions.version', 'must be a non-empty text');
  r('air.outdoorCo2Ppm', set.air.outdoorCo2Ppm.value, 250, 1000);
  r('air.atmosphericPressureKpa', set.air.atmosphericPressureKpa.value, 80, 110);
  for (const [use, met] of Object.entries(set.occupancy.pupilMetByUse.value))
    r(`occupancy.pupilMetByUse.${use}`, met, 1, 4);
  for (const [age, d] of Object.entries(set.occupancy.pupilMetAdjustByAge.value))
    r(`occupancy.pupilMetAdjustByAge.${age}`, d, -1, 1);
  // Every use and age together must stay inside Persily & de Jonge's Table 4 (1–4 met): nothing is clamped.
  for (const use of ROOM_USES)
    for (const age of AGE_GROUPS) {
      const met = set.occupancy.pupilMetByUse.value[use] + set.occupancy.pupilMetAdjustByAge.value[age];
      if (!(met >= 1 && met <= 4))
        throw new EngineInputError(
          `assumptions.occupancy.pupilMetAdjustByAge.${age}`,
          `takes ${use} pupils to ${met} met, outside the 1–4 met of Persily & de Jonge (2017) Table 4`,
        );
    }
  r('occupancy.adultMet', set.occupancy.adultMet.value, 1, 4);
  const tt = set.occupancy.timetable.value;
  if (tt.length === 0) throw new EngineInputError('assumptions.occupancy.timetable', 'needs at least one period');
  tt.forEach((seg, i) => {
    const path = `occupancy.timetable.${i}`;
    r(`${path}.startMinute`, seg.startMinute, 0, 1440);
    r(`${path}.endMinute`, seg.endMinute, seg.startMinute + 1, 1440);
    r(`${path}.occupancyFraction`, seg.occupancyFraction, 0, 1);
    const prev = tt[i - 1];
    if (prev && prev.endMinute !== seg.startMinute) {
      throw new EngineInputError(
        `assumptions.${path}.startMinute`,
        `must start when the previous period ends (${prev.endMinute})`,
      );
    }
  });
  for (const [season, s] of Object.entries(set.seasons.value)) {
    const path = `seasons.${season}`;
    if (s.months.length === 0) throw new EngineInputError(`assumptions.${path}.months`, 'needs at least one month');
    for (const m of s.months) r(`${path}.months`, m, 1, 12);
    r(`${path}.schoolDays`, s.schoolDays, 0, 366);
    r(`${path}.indoorTempC`, s.indoorTempC, 10, 30);
    r(`${path}.windowOpenFractionOccupied`, s.windowOpenFractionOccupied, 0, 1);
    r(`${path}.windowOpenFractionEmpty`, s.windowOpenFractionEmpty, 0, 1);
  }
  for (const [code, reg] of Object.entries(set.climate.regions.value)) {
    if (reg.monthlyMeanTempC.length !== 12)
      throw new EngineInputError(`assumptions.climate.regions.${code}.monthlyMeanTempC`, 'needs twelve months');
    for (const [i, t] of reg.monthlyMeanTempC.entries()) r(`climate.regions.${code}.monthlyMeanTempC.${i}`, t, -30, 40);
    for (const [season, w] of Object.entries(reg.windSpeedMs))
      r(`climate.regions.${code}.windSpeedMs.${season}`, w, 0, 30);
  }
  const twelve = (path: string, values: readonly number[], min: number, max: number) => {
    if (values.length !== 12) throw new EngineInputError(`assumptions.${path}`, 'needs twelve months');
    for (const [i, v] of values.entries()) r(`${path}.${i}`, v, min, max);
  };
  twelve('climate.dailyRangeK', set.climate.dailyRangeK.value, 0, 25);
  twelve('climate.dayToDaySdK', set.climate.dayToDaySdK.value, 0, 10);
  r('windows.dischargeCoefficient', set.windows.dischargeCoefficient.value, 0.1, 1);
  r('windows.openingHeightM', set.windows.openingHeightM.value, 0.1, 5);
  for (const [t, f] of Object.entries(set.windows.effectiveOpeningFactor.value))
    r(`windows.effectiveOpeningFactor.${t}`, f, 0, 1);
  r('windows.crossWindDeltaCp', set.windows.crossWindDeltaCp.value, 0, 1.5);
  r('windows.siteWindFactor', set.windows.siteWindFactor.value, 0, 1.5);
  r('windows.windowUseWithMechanical', set.windows.windowUseWithMechanical.value, 0, 1);
  for (const [m, f] of Object.entries(set.windows.frameFactorByMaterial.value))
    r(`windows.frameFactorByMaterial.${m}`, f, 0.3, 1);
  r('infiltration.kpDivisor', set.infiltration.kpDivisor.value, 5, 50);
  r('infiltration.envelopeAreaPerFloorArea', set.infiltration.envelopeAreaPerFloorArea.value, 0, 10);
  r('mechanical.defaultSupplyLpsPerM2', set.mechanical.defaultSupplyLpsPerM2.value, 0, 20);
  for (const type of VENTILATION_TYPES) {
    const sys = set.mechanical.existingSystems.value[type];
    const path = `mechanical.existingSystems.${type}`;
    if (!sys) throw new EngineInputError(`assumptions.${path}`, 'is missing');
    requireOneOf(`assumptions.${path}.balance`, sys.balance, ['none', 'balanced', 'unbalanced'] as const);
    r(`${path}.specificFanPowerWPerLps`, sys.specificFanPowerWPerLps, 0, 5);
    r(`${path}.heatRecoveryEfficiency`, sys.heatRecoveryEfficiency, 0, 0.95);
  }
  r('mechanical.existingMaintenanceShareOfUnits', set.mechanical.existingMaintenanceShareOfUnits.value, 0, 3);
  for (const p of set.criteria.packs.value) {
    r(`criteria.packs.${p.id}.meanLimitPpm`, p.meanLimitPpm, 100, 10000);
    if (p.maxLimitPpm !== null) r(`criteria.packs.${p.id}.maxLimitPpm`, p.maxLimitPpm, 100, 10000);
    if (p.maxMinutesCap !== null) r(`criteria.packs.${p.id}.maxMinutesCap`, p.maxMinutesCap, 0, 1440);
  }
  r('criteria.newBuildFromYear', set.criteria.newBuildFromYear.value, 1900, 2100);
  r('risk.farOverShare', set.risk.farOverShare.value, 0.01, 2);
  r('risk.scoreHalfPupilHours', set.risk.scoreHalfPupilHours.value, 1, 1e9);
  r('energy.heatingIndoorTempC', set.energy.heatingIndoorTempC.value, 10, 30);
  r('energy.heatingCutoffTempC', set.energy.heatingCutoffTempC.value, 0, 30);
  r('energy.airHeatCapacityWPerLpsK', set.energy.airHeatCapacityWPerLpsK.value, 1, 1.4);
  for (const [f, e] of Object.entries(set.energy.heatGeneratorEfficiency.value))
    r(`energy.heatGeneratorEfficiency.${f}`, e, 0.3, 6);
  for (const [f, v] of Object.entries(set.finance.fuelPricesGbpPerKwh.value))
    r(`finance.fuelPricesGbpPerKwh.${f}`, v, 0, 2);
  for (const [f, v] of Object.entries(set.finance.carbonFactorsKgCo2ePerKwh.value))
    r(`finance.carbonFactorsKgCo2ePerKwh.${f}`, v, 0, 2);
  r('finance.electricityPriceGbpPerKwh', set.finance.electricityPriceGbpPerKwh.value, 0, 2);
  r('finance.electricityKgCo2ePerKwh', set.finance.electricityKgCo2ePerKwh.value, 0, 2);
  r('finance.discountRate', set.finance.discountRate.value, 0, 0.2);
  r('finance.appraisalYears', set.finance.appraisalYears.value, 1, 60);
  requireOneOf('assumptions.finance.headlineBaseline', set.finance.headlineBaseline.value, BASELINES);
  set.retrofit.unitCatalogue.value.forEach((u, i) => {
    const path = `retrofit.unitCatalogue.${i}`;
    r(`${path}.nominalFlowLps`, u.nominalFlowLps, 1, 5000);
    r(`${path}.heatRecoveryEfficiency`, u.heatRecoveryEfficiency, 0, 0.99);
    r(`${path}.specificFanPowerWPerLps`, u.specificFanPowerWPerLps, 0, 5);
    r(`${path}.installedCostGbp`, u.installedCostGbp, 0, 1e6);
    r(`${path}.annualMaintenanceGbp`, u.annualMaintenanceGbp, 0, 1e5);
    r(`${path}.lifeYears`, u.lifeYears, 1, 60);
    r(`${path}.soundDbA`, u.soundDbA, 0, 100);
  });
  r('comfort.deskDistanceFromWindowM', set.comfort.deskDistanceFromWindowM.value, 0, 10);
  r('comfort.winterAirSpeedMs', set.comfort.winterAirSpeedMs.value, 0, 0.5);
  r('comfort.draughtTurbulencePct', set.comfort.draughtTurbulencePct.value, 10, 60);
  r('comfort.winterClothingClo', set.comfort.winterClothingClo.value, 0, 2);
  r('comfort.winterRelativeHumidityPct', set.comfort.winterRelativeHumidityPct.value, 0, 100);
  r('retrofit.soundLimitDbA', set.retrofit.soundLimitDbA.value, 0, 100);
  r('retrofit.maxUnitsPerRoom', set.retrofit.maxUnitsPerRoom.value, 1, 20);
  for (const [season, share] of Object.entries(set.retrofit.windowKeptWithUnits.value))
    r(`retrofit.windowKeptWithUnits.${season}`, share, 0, 1);
  const op = set.retrofit.operation.value;
  requireOneOf('assumptions.retrofit.operation.summerMode', op.summerMode, SUMMER_MODES);
  r('retrofit.operation.extraRunHoursPerDay', op.extraRunHoursPerDay, 0, 12);
  const simple = set.retrofit.simplerOption.value;
  r('retrofit.simplerOption.capitalBaseGbp', simple.capitalBaseGbp, 0, 1e6);
  r('retrofit.simplerOption.capitalGbpPerLps', simple.capitalGbpPerLps, 0, 1e4);
  r('retrofit.simplerOption.specificFanPowerWPerLps', simple.specificFanPowerWPerLps, 0, 5);
  r('retrofit.simplerOption.annualMaintenanceGbp', simple.annualMaintenanceGbp, 0, 1e5);
  r('retrofit.simplerOption.lifeYears', simple.lifeYears, 1, 60);
  const d = set.defaults.room.value;
  requireOneOf('assumptions.defaults.room.use', d.use, ROOM_USES);
  r('defaults.room.ceilingHeightM', d.ceilingHeightM, 2, 12);
  r('defaults.room.floorAreaPerPupilM2', d.floorAreaPerPupilM2, 0.5, 20);
  r('defaults.room.adultsInTeachingRoom', d.adultsInTeachingRoom, 0, 10);
  r('defaults.room.glazingShareOfFloor', d.glazingShareOfFloor, 0, 3);
  r('defaults.room.openableShareOfGlazing', d.openableShareOfGlazing, 0, 1);
  requireOneOf('assumptions.defaults.room.windowType', d.windowType, WINDOW_TYPES);
  r('defaults.room.glazingGValue', d.glazingGValue, 0.1, 0.9);
  requireOneOf('assumptions.defaults.room.ventilationType', d.ventilationType, VENTILATION_TYPES);
}
