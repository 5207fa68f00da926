/**
 * Turns a programme's settings and candidate rooms into the optimisation problem: slots (window × year) with
 * their capacity, each year's budget and cost factor, and one item per room with the slots it may use.
 * Rooms that cannot be in any plan are set aside here with the reason.
 */
import { EngineInputError, requireRange } from '../errors';
import { WINDOW_ORDER, WINDOW_LABELS } from './calendar';
import { checkOnCostRates, costFactor } from './on-costs';
import {
  type PlanItem,
  type ProgrammeCandidate,
  type ProgrammeProblem,
  type ProgrammeSettings,
  type Slot,
  WINDOW_IDS,
} from './types';

/** Each year sooner is worth 1 % more: among plans of equal benefit, the worst air is cleared first (an Airtally rule). */
export const EARLINESS_PER_YEAR = 0.01;

/** Why a room is not in the plan. */
export type MissReason =
  | 'kept_out'
  | 'no_benefit'
  | 'too_many_units'
  | 'costs_more_than_budget'
  | 'heating_year_outside'
  | 'not_funded';

/** A room set aside before (or left out by) the optimisation, with its reason. */
export interface Exclusion {
  roomId: string;
  reason: MissReason;
}

/** The problem with the candidates it was built from (same order as its items) and the rooms set aside. */
export interface BuiltProblem {
  problem: ProgrammeProblem;
  candidates: ProgrammeCandidate[];
  excluded: Exclusion[];
  /** Every candidate given, by room id (including those set aside). */
  byRoom: Map<string, ProgrammeCandidate>;
}

/** Checks the settings on their own (ranges, one entry per window, no room both forced in and kept out). */
export function checkSettings(s: ProgrammeSettings): void {
  const years = s.budgetsGbp.length;
  if (years < 1 || years > 10)
    throw new EngineInputError('budgetsGbp', `give a budget for 1 to 10 years, got ${years}`);
  for (const [i, b] of s.budgetsGbp.entries()) requireRange(`budgetsGbp.${i}`, b, 0, 1e9, '£');
  requireRange('firstYear', s.firstYear, 2000, 2100);
  checkOnCostRates(s.onCosts);
  requireRange('unitsPerWorkingDay', s.unitsPerWorkingDay, 0, 1000, 'units');
  requireRange('mobilisationGbp', s.mobilisationGbp, 0, 1e6, '£');
  requireRange('energyPriceChangePct', s.energyPriceChangePct, -90, 500, '%');
  const ids = s.windows.map((w) => w.id);
  if (ids.length !== WINDOW_IDS.length || WINDOW_IDS.some((id) => !ids.includes(id)))
    throw new EngineInputError('windows', `give each window once: ${WINDOW_IDS.join(', ')}`);
  for (const w of s.windows) requireRange(`windows.${w.id}.workingDays`, w.workingDays, 0, 60, 'working days');
  const kept = new Set(s.keptOut);
  const clash = s.forcedIn.find((id) => kept.has(id));
  if (clash) throw new EngineInputError('forcedIn', 'a room cannot be both forced in and kept out');
  for (const pin of s.pins) {
    if (kept.has(pin.roomId)) throw new EngineInputError('pins', 'a kept-out room cannot be pinned');
    if (!Number.isInteger(pin.year) || pin.year < 1 || pin.year > years)
      throw new EngineInputError(
        'pins',
        `a room is pinned to year ${pin.year}, outside the programme's ${years} years`,
      );
    const days = s.windows.find((w) => w.id === pin.windowId)?.workingDays;
    if (pin.windowId !== null && !(days && days > 0))
      throw new EngineInputError(
        'pins',
        `a room is pinned to the ${WINDOW_LABELS[pin.windowId]}, which has no working days`,
      );
  }
  for (const join of s.heatingJoins)
    if (!Number.isInteger(join.year) || join.year < 1) throw new EngineInputError('heatingJoins', 'years start at 1');
}

/** The value the plan maximises for one room. */
export function roomValue(c: ProgrammeCandidate, objective: ProgrammeSettings['objective']): number {
  return objective === 'rank_weights' ? c.rankScore : c.pupilHoursRemovedPerYear;
}

/** Builds the problem. Candidates are taken in room-id order, so the same inputs always give the same problem. */
export function buildProblem(settings: ProgrammeSettings, candidates: readonly ProgrammeCandidate[]): BuiltProblem {
  checkSettings(settings);
  const years = settings.budgetsGbp.length;
  const days = new Map(settings.windows.map((w) => [w.id, w.workingDays]));
  const slots: Slot[] = [];
  for (let year = 1; year <= years; year++)
    for (const windowId of WINDOW_ORDER[settings.yearConvention]) {
      const capacityUnits = Math.floor((days.get(windowId) ?? 0) * settings.unitsPerWorkingDay + 1e-9);
      if (capacityUnits > 0) slots.push({ index: slots.length, year, windowId, capacityUnits });
    }
  const costFactorByYear = Array.from({ length: years }, (_, i) => costFactor(settings.onCosts, i + 1));

  const kept = new Set(settings.keptOut);
  const forced = new Set(settings.forcedIn);
  const pins = new Map(settings.pins.map((p) => [p.roomId, p]));
  const joins = new Map(settings.heatingJoins.map((j) => [j.blockId, j.year]));
  const sorted = [...candidates].sort((a, b) => (a.roomId < b.roomId ? -1 : a.roomId > b.roomId ? 1 : 0));
  const schoolIndex = new Map<string, number>();
  const items: PlanItem[] = [];
  const placeable: ProgrammeCandidate[] = [];
  const excluded: Exclusion[] = [];

  for (const c of sorted) {
    if (kept.has(c.roomId)) {
      excluded.push({ roomId: c.roomId, reason: 'kept_out' });
      continue;
    }
    const pin = pins.get(c.roomId) ?? null;
    const mustPlace = forced.has(c.roomId) || pin !== null;
    const value = roomValue(c, settings.objective);
    if (!(value > 0) && !mustPlace) {
      excluded.push({ roomId: c.roomId, reason: 'no_benefit' });
      continue;
    }
    const joinYear = c.blockId ? (joins.get(c.blockId) ?? null) : null;
    if (joinYear !== null && joinYear > years && !pin) {
      excluded.push({ roomId: c.roomId, reason: 'heating_year_outside' });
      continue;
    }
    const yearOnly = pin ? pin.year : joinYear;
    let allowed = slots.filter(
      (s) =>
        s.capacityUnits >= c.units &&
        (yearOnly === null || s.year === yearOnly) &&
        (pin?.windowId ? s.windowId === pin.windowId : true),
    );
    // Heating replacements are summer work: a room joining one goes in that summer when the window is open.
    if (!pin && joinYear !== null && allowed.some((s) => s.windowId === 'summer'))
      allowed = allowed.filter((s) => s.windowId === 'summer');
    if (allowed.length === 0) {
      if (mustPlace)
        throw new EngineInputError(
          'pins',
          `room ${c.roomCode} needs ${c.units} units, more than any window it may go in can fit`,
        );
      excluded.push({ roomId: c.roomId, reason: 'too_many_units' });
      continue;
    }
    const budgetOk = allowed.some(
      (s) => c.installedCostGbp * costFactorByYear[s.year - 1]! <= settings.budgetsGbp[s.year - 1]!,
    );
    if (!budgetOk && !mustPlace) {
      excluded.push({ roomId: c.roomId, reason: 'costs_more_than_budget' });
      continue;
    }
    let school = schoolIndex.get(c.schoolId);
    if (school === undefined) {
      school = schoolIndex.size;
      schoolIndex.set(c.schoolId, school);
    }
    items.push({
      roomId: c.roomId,
      school,
      units: c.units,
      baseCostGbp: c.installedCostGbp,
      value: Math.max(0, value),
      allowedSlots: allowed.map((s) => s.index),
      mustPlace,
      mobilisationWaived: joinYear !== null && (!pin || pin.year === joinYear),
    });
    placeable.push(c);
  }
  return {
    problem: {
      years,
      slots,
      budgetsGbp: [...settings.budgetsGbp],
      costFactorByYear,
      mobilisationGbp: settings.mobilisationGbp,
      schoolIds: [...schoolIndex.keys()],
      items,
      earlinessWeight: EARLINESS_PER_YEAR,
    },
    candidates: placeable,
    excluded,
    byRoom: new Map(sorted.map((c) => [c.roomId, c])),
  };
}

/** The objective weight of a room's value in programme year `year`. */
export function yearWeight(problem: ProgrammeProblem, year: number): number {
  return 1 + problem.earlinessWeight * (problem.years - year);
}
