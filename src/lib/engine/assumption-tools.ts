/** Helpers the app uses to show, edit and check an assumption set. */
import { EngineInputError, requireOneOf, requireRange } from './errors';
import { assumptionChoices, assumptionLimit } from './assumption-limits';
import { AGE_GROUPS, ROOM_USES, VENTILATION_TYPES } from './vocabulary';
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

const isRecord = (x: unknown): x is Record<string, unknown> => typeof x === 'object' && x !== null && !Array.isArray(x);

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

/**
 * Every number and coded text inside an assumption set with its path, e.g. ['seasons.winter.schoolDays', 50].
 * Catalogue units are included; identity fields (ids, names, sources, notes) are not numbers and are skipped.
 */
export function assumptionLeaves(set: AssumptionSet): [path: string, value: unknown][] {
  const out: [string, unknown][] = [];
  const walk = (node: unknown, path: string): void => {
    if (typeof node === 'number' || typeof node === 'string' || typeof node === 'boolean' || node === null) {
      out.push([path, node]);
      return;
    }
    if (Array.isArray(node)) for (const [i, item] of node.entries()) walk(item, `${path}.${i}`);
    else if (typeof node === 'object') for (const [k, v] of Object.entries(node)) walk(v, `${path}.${k}`);
  };
  for (const entry of listAssumptions(set)) walk(entry.value, entry.path);
  return out;
}

/**
 * Throws EngineInputError naming the first value of the set outside its declared range or choices (path prefixed
 * 'assumptions.'; ranges from assumption-limits.ts), or the first rule between values that does not hold.
 */
export function validateAssumptionSet(set: AssumptionSet): void {
  if (typeof set.version !== 'string' || set.version === '')
    throw new EngineInputError('assumptions.version', 'must be a non-empty text');
  for (const [path, value] of assumptionLeaves(set)) {
    const limit = assumptionLimit(path);
    if (limit && value !== null) {
      requireRange(`assumptions.${path}`, value as number, limit.min, limit.max);
      if (limit.integer && !Number.isInteger(value))
        throw new EngineInputError(`assumptions.${path}`, 'must be a whole number');
      continue;
    }
    const choices = assumptionChoices(path);
    if (choices) requireOneOf(`assumptions.${path}`, value as string, choices);
  }
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
  const tt = set.occupancy.timetable.value;
  if (tt.length === 0) throw new EngineInputError('assumptions.occupancy.timetable', 'needs at least one period');
  tt.forEach((seg, i) => {
    const path = `occupancy.timetable.${i}`;
    if (seg.endMinute <= seg.startMinute)
      throw new EngineInputError(`assumptions.${path}.endMinute`, 'must be after the period starts');
    const prev = tt[i - 1];
    if (prev && prev.endMinute !== seg.startMinute) {
      throw new EngineInputError(
        `assumptions.${path}.startMinute`,
        `must start when the previous period ends (${prev.endMinute})`,
      );
    }
  });
  for (const [season, s] of Object.entries(set.seasons.value))
    if (s.months.length === 0)
      throw new EngineInputError(`assumptions.seasons.${season}.months`, 'needs at least one month');
  const twelve = (path: string, values: readonly number[]) => {
    if (values.length !== 12) throw new EngineInputError(`assumptions.${path}`, 'needs twelve months');
  };
  for (const [code, reg] of Object.entries(set.climate.regions.value))
    twelve(`climate.regions.${code}.monthlyMeanTempC`, reg.monthlyMeanTempC);
  twelve('climate.dailyRangeK', set.climate.dailyRangeK.value);
  twelve('climate.dayToDaySdK', set.climate.dayToDaySdK.value);
  for (const type of VENTILATION_TYPES)
    if (!set.mechanical.existingSystems.value[type])
      throw new EngineInputError(`assumptions.mechanical.existingSystems.${type}`, 'is missing');
  for (const [i, p] of set.criteria.packs.value.entries())
    if (p.maxLimitPpm !== null && p.maxLimitPpm < p.meanLimitPpm)
      throw new EngineInputError(
        `assumptions.criteria.packs.${i}.maxLimitPpm`,
        'must not be below the daily-mean limit',
      );
}
