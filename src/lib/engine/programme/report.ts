/**
 * What a plan means for the people who read it: year by year, window by window, school by school — rooms,
 * units, capital with on-costs, pupils helped, pupil-hours removed, carbon and money saved — with the
 * cumulative benefit against spend, what the next and the last £100k buy, and why each room left out is out.
 * Members limited to some schools see only those schools' lines and totals.
 */
import { formatGbp, formatInt, formatOneDecimal } from '../format';
import { WINDOW_LABELS, WINDOW_ORDER, programmeYearLabel, windowLabel } from './calendar';
import type { BuiltProblem, MissReason } from './model';
import { type OnCostBreakdown, onCostBreakdown, sumBreakdowns } from './on-costs';
import { PlanState } from './plan-state';
import type { Assignment, ProgrammeCandidate, ProgrammeSettings, SolveInfo, WindowId } from './types';

/** The size of the "next" and "last" tranches of capital, £. */
export const TRANCHE_GBP = 100_000;

/** Sums over a set of rooms. */
export interface PlanTotals {
  rooms: number;
  units: number;
  /** Capital charged to the budget, with on-costs and visits, £. */
  capitalGbp: number;
  visits: number;
  mobilisationGbp: number;
  pupils: number;
  pupilHoursRemovedPerYear: number;
  annualSavingKgCo2e: number;
  annualSavingGbp: number;
  /** Tonnes CO2e saved over the units' life (rooms with a known life). */
  lifetimeTonnesCo2e: number;
}

/** One room in the plan. */
export interface RoomLine {
  roomId: string;
  roomCode: string;
  roomName: string;
  schoolId: string;
  schoolName: string;
  blockId: string | null;
  blockName: string | null;
  units: number;
  unitsLabel: string;
  installedCostGbp: number;
  /** On-cost build-up of the installed price in the room's year. */
  capital: OnCostBreakdown;
  pupils: number;
  pupilHoursRemovedPerYear: number;
  annualSavingGbp: number;
  annualSavingKgCo2e: number;
  lifetimeTonnesCo2e: number | null;
  rank: number | null;
  riskBand: number;
  predictedMeanCo2Ppm: number;
  predictedPeakCo2Ppm: number;
  measuredMeanCo2Ppm: number | null;
  /** The assessment's reason for the room's risk, as evidence. */
  riskReason: string;
  pinned: boolean;
  forcedIn: boolean;
  joinsHeating: boolean;
  year: number;
  windowId: WindowId;
}

export interface SchoolVisit {
  schoolId: string;
  schoolName: string;
  /** Mobilisation with on-costs; null when every room joins a heating project (no visit of its own). */
  mobilisation: OnCostBreakdown | null;
  rooms: RoomLine[];
  totals: PlanTotals;
}

export interface WindowPlan {
  windowId: WindowId;
  label: string;
  capacityUnits: number;
  schools: SchoolVisit[];
  totals: PlanTotals;
}

export interface YearPlan {
  year: number;
  label: string;
  budgetGbp: number;
  /** The year's on-cost build-up over the rooms and visits shown. */
  breakdown: OnCostBreakdown;
  windows: WindowPlan[];
  totals: PlanTotals;
}

export interface MissLine {
  roomId: string;
  roomCode: string;
  roomName: string;
  schoolId: string;
  schoolName: string;
  reason: MissReason | 'no_units_fit';
  words: string;
  pupilHoursRemovedPerYear: number;
}

export interface Tranche {
  capitalGbp: number;
  pupilHoursRemovedPerYear: number;
  pupils: number;
  rooms: {
    roomId: string;
    roomCode: string;
    schoolName: string;
    year: number;
    capitalGbp: number;
    pupilHoursRemovedPerYear: number;
  }[];
  words: string;
}

export interface CumulativePoint {
  label: string;
  cumulativeCapitalGbp: number;
  cumulativePupilHoursRemoved: number;
}

/** A room that fails its criterion but that no combination of catalogue units can fix (from the appraisal). */
export interface UnplannableRoom {
  roomId: string;
  roomCode: string;
  roomName: string;
  schoolId: string;
  schoolName: string;
  reason: string;
}

export interface ProgrammeReport {
  years: YearPlan[];
  totals: PlanTotals;
  budgetTotalGbp: number;
  cumulative: CumulativePoint[];
  nextTranche: Tranche;
  lastTranche: Tranche;
  misses: MissLine[];
  solve: SolveInfo;
  /** True when the reader sees only some schools (totals are theirs only). */
  partial: boolean;
}

const emptyTotals = (): PlanTotals => ({
  rooms: 0,
  units: 0,
  capitalGbp: 0,
  visits: 0,
  mobilisationGbp: 0,
  pupils: 0,
  pupilHoursRemovedPerYear: 0,
  annualSavingKgCo2e: 0,
  annualSavingGbp: 0,
  lifetimeTonnesCo2e: 0,
});

function addRoom(t: PlanTotals, r: RoomLine): void {
  t.rooms += 1;
  t.units += r.units;
  t.capitalGbp += r.capital.chargedGbp;
  t.pupils += r.pupils;
  t.pupilHoursRemovedPerYear += r.pupilHoursRemovedPerYear;
  t.annualSavingKgCo2e += r.annualSavingKgCo2e;
  t.annualSavingGbp += r.annualSavingGbp;
  t.lifetimeTonnesCo2e += r.lifetimeTonnesCo2e ?? 0;
}

function addTotals(t: PlanTotals, o: PlanTotals): void {
  for (const key of Object.keys(t) as (keyof PlanTotals)[]) t[key] += o[key];
}

/** Net money saved a year with energy prices changed by `pct` % (maintenance unchanged). */
export function scenarioSavingGbp(c: ProgrammeCandidate, pct: number): number {
  return (c.annualSavingGbp + c.annualMaintenanceGbp) * (1 + pct / 100) - c.annualMaintenanceGbp;
}

/** Tonnes CO2e over the units' life, or null when the life is unknown. */
export const lifetimeTonnes = (c: ProgrammeCandidate) =>
  c.lifeYears === null ? null : (c.annualSavingKgCo2e * c.lifeYears) / 1000;

/** Builds the report of `assignment`. `visibleSchoolIds` null shows every school. */
export function buildReport(args: {
  settings: ProgrammeSettings;
  built: BuiltProblem;
  assignment: Assignment;
  solve: SolveInfo;
  unplannable?: readonly UnplannableRoom[];
  visibleSchoolIds?: readonly string[] | null;
}): ProgrammeReport {
  const { settings, built, assignment, solve } = args;
  const { problem, candidates } = built;
  const visible = args.visibleSchoolIds ? new Set(args.visibleSchoolIds) : null;
  const shows = (schoolId: string) => !visible || visible.has(schoolId);
  const forced = new Set(settings.forcedIn);
  const pinned = new Set(settings.pins.map((p) => p.roomId));
  const joined = new Set(settings.heatingJoins.map((j) => j.blockId));
  const order = WINDOW_ORDER[settings.yearConvention];

  const line = (i: number): RoomLine => {
    const c = candidates[i]!;
    const slot = problem.slots[assignment[i]!]!;
    return {
      roomId: c.roomId,
      roomCode: c.roomCode,
      roomName: c.roomName,
      schoolId: c.schoolId,
      schoolName: c.schoolName,
      blockId: c.blockId,
      blockName: c.blockName,
      units: c.units,
      unitsLabel: c.unitsLabel,
      installedCostGbp: c.installedCostGbp,
      capital: onCostBreakdown(c.installedCostGbp, settings.onCosts, slot.year),
      pupils: c.pupils,
      pupilHoursRemovedPerYear: c.pupilHoursRemovedPerYear,
      annualSavingGbp: scenarioSavingGbp(c, settings.energyPriceChangePct),
      annualSavingKgCo2e: c.annualSavingKgCo2e,
      lifetimeTonnesCo2e: lifetimeTonnes(c),
      rank: c.rank,
      riskBand: c.riskBand,
      predictedMeanCo2Ppm: c.predictedMeanCo2Ppm,
      predictedPeakCo2Ppm: c.predictedPeakCo2Ppm,
      measuredMeanCo2Ppm: c.measuredMeanCo2Ppm,
      riskReason: c.riskReason,
      pinned: pinned.has(c.roomId),
      forcedIn: forced.has(c.roomId),
      joinsHeating: problem.items[i]!.mobilisationWaived && c.blockId !== null && joined.has(c.blockId),
      year: slot.year,
      windowId: slot.windowId,
    };
  };

  // Rooms by slot, then school, in a fixed order: windows as they fall, schools by name, rooms by benefit.
  const bySlot = new Map<number, number[]>();
  assignment.forEach((k, i) => {
    if (k < 0 || !shows(candidates[i]!.schoolId)) return;
    const list = bySlot.get(k) ?? [];
    list.push(i);
    bySlot.set(k, list);
  });
  const years: YearPlan[] = [];
  const totals = emptyTotals();
  const cumulative: CumulativePoint[] = [{ label: 'Start', cumulativeCapitalGbp: 0, cumulativePupilHoursRemoved: 0 }];
  for (let year = 1; year <= problem.years; year++) {
    const yearTotals = emptyTotals();
    const breakdowns: OnCostBreakdown[] = [];
    const windows: WindowPlan[] = [];
    for (const windowId of order) {
      const slot = problem.slots.find((s) => s.year === year && s.windowId === windowId);
      if (!slot) continue;
      const windowTotals = emptyTotals();
      const schools = new Map<string, SchoolVisit>();
      for (const i of bySlot.get(slot.index) ?? []) {
        const c = candidates[i]!;
        let visit = schools.get(c.schoolId);
        if (!visit) {
          visit = {
            schoolId: c.schoolId,
            schoolName: c.schoolName,
            mobilisation: null,
            rooms: [],
            totals: emptyTotals(),
          };
          schools.set(c.schoolId, visit);
        }
        const room = line(i);
        visit.rooms.push(room);
        addRoom(visit.totals, room);
        breakdowns.push(room.capital);
        if (!problem.items[i]!.mobilisationWaived && !visit.mobilisation) {
          visit.mobilisation = onCostBreakdown(problem.mobilisationGbp, settings.onCosts, year);
          visit.totals.visits = 1;
          visit.totals.mobilisationGbp = visit.mobilisation.chargedGbp;
          visit.totals.capitalGbp += visit.mobilisation.chargedGbp;
          breakdowns.push(visit.mobilisation);
        }
      }
      const visits = [...schools.values()].sort((a, b) => a.schoolName.localeCompare(b.schoolName, 'en-GB'));
      for (const visit of visits) {
        visit.rooms.sort(
          (a, b) =>
            b.pupilHoursRemovedPerYear - a.pupilHoursRemovedPerYear || a.roomCode.localeCompare(b.roomCode, 'en-GB'),
        );
        addTotals(windowTotals, visit.totals);
        let capital = visit.mobilisation?.chargedGbp ?? 0;
        for (const room of visit.rooms) {
          capital += room.capital.chargedGbp;
          cumulative.push({
            label: `${room.roomCode}, ${visit.schoolName} (${windowLabel(settings.yearConvention, settings.firstYear, year, windowId)})`,
            cumulativeCapitalGbp: cumulative.at(-1)!.cumulativeCapitalGbp + capital,
            cumulativePupilHoursRemoved: cumulative.at(-1)!.cumulativePupilHoursRemoved + room.pupilHoursRemovedPerYear,
          });
          capital = 0;
        }
      }
      addTotals(yearTotals, windowTotals);
      windows.push({
        windowId,
        label: windowLabel(settings.yearConvention, settings.firstYear, year, windowId),
        capacityUnits: slot.capacityUnits,
        schools: visits,
        totals: windowTotals,
      });
    }
    addTotals(totals, yearTotals);
    years.push({
      year,
      label: programmeYearLabel(settings.yearConvention, settings.firstYear, year),
      budgetGbp: problem.budgetsGbp[year - 1]!,
      breakdown: sumBreakdowns(breakdowns),
      windows,
      totals: yearTotals,
    });
  }

  return {
    years,
    totals,
    budgetTotalGbp: problem.budgetsGbp.reduce((a, b) => a + b, 0),
    cumulative: thin(cumulative, 400),
    nextTranche: nextTranche(args, shows),
    lastTranche: lastTranche(args, shows),
    misses: misses(args, shows),
    solve,
    partial: visible !== null,
  };
}

/** At most `max` points, always keeping the first and the last. */
function thin<T>(points: T[], max: number): T[] {
  if (points.length <= max) return points;
  const step = (points.length - 1) / (max - 1);
  return Array.from({ length: max }, (_, j) => points[Math.round(j * step)]!);
}

type ReportArgs = Parameters<typeof buildReport>[0];

/** Benefit per £1,000 of capital, for the words. */
const per1000 = (value: number, gbp: number) => (gbp > 0 ? (1000 * value) / gbp : 0);

/** One room of a tranche. */
const trancheRoom = (c: ProgrammeCandidate, year: number, capitalGbp: number): Tranche['rooms'][number] => ({
  roomId: c.roomId,
  roomCode: c.roomCode,
  schoolName: c.schoolName,
  year,
  capitalGbp,
  pupilHoursRemovedPerYear: c.pupilHoursRemovedPerYear,
});

/**
 * What £100k more would buy: rooms not in the plan, best benefit per pound first (a visit's mobilisation
 * counted when the school is not already there), each in the earliest window with room for it.
 */
function nextTranche(args: ReportArgs, shows: (schoolId: string) => boolean): Tranche {
  const { built, assignment } = args;
  const { problem, candidates } = built;
  const state = new PlanState(problem);
  assignment.forEach((k, i) => {
    if (k >= 0) state.place(i, k);
  });
  const left = problem.budgetsGbp.map((b, y) => Math.max(0, b - state.spendByYearGbp[y]!));
  let pool = TRANCHE_GBP;
  const order = problem.items
    .map((_, i) => i)
    .filter((i) => assignment[i]! < 0)
    .sort((a, b) => {
      const ia = problem.items[a]!;
      const ib = problem.items[b]!;
      return ib.value / (ib.baseCostGbp || 1) - ia.value / (ia.baseCostGbp || 1) || a - b;
    });
  const rooms: Tranche['rooms'] = [];
  let capitalGbp = 0;
  let value = 0;
  let pupils = 0;
  for (const i of order) {
    const item = problem.items[i]!;
    for (const k of item.allowedSlots) {
      if (state.unitsBySlot[k]! + item.units > problem.slots[k]!.capacityUnits) continue;
      const y = problem.slots[k]!.year - 1;
      const cost = state.costIn(i, k);
      const fromPool = Math.max(0, cost - left[y]!);
      if (fromPool > pool) continue;
      pool -= fromPool;
      left[y] = Math.max(0, left[y]! - cost);
      state.place(i, k);
      const c = candidates[i]!;
      capitalGbp += cost;
      if (shows(c.schoolId)) {
        value += c.pupilHoursRemovedPerYear;
        pupils += c.pupils;
        rooms.push(trancheRoom(c, y + 1, cost));
      }
      break;
    }
  }
  const words =
    rooms.length === 0
      ? `Another ${formatGbp(TRANCHE_GBP)} would buy nothing more: every room that could be done is in the plan, or the windows are full.`
      : `Another ${formatGbp(TRANCHE_GBP)} would add ${rooms.length} room${rooms.length === 1 ? '' : 's'} for ${formatInt(pupils)} pupils, ` +
        `removing about ${formatInt(value)} pupil-hours of poor air a year (${formatOneDecimal(per1000(value, capitalGbp))} per £1,000).`;
  return { capitalGbp, pupilHoursRemovedPerYear: value, pupils, rooms, words };
}

/** What the last £100k of the plan bought: its rooms of lowest benefit per pound, up to £100k of capital. */
function lastTranche(args: ReportArgs, shows: (schoolId: string) => boolean): Tranche {
  const { built, assignment } = args;
  const { problem, candidates } = built;
  const placed = problem.items
    .map((item, i) => ({ item, i, k: assignment[i]! }))
    .filter(({ item, k }) => k >= 0 && !item.mustPlace)
    .map(({ item, i, k }) => {
      const year = problem.slots[k]!.year;
      const capital = item.baseCostGbp * problem.costFactorByYear[year - 1]!;
      return { i, year, capital, ratio: item.value / (capital || 1) };
    })
    .sort((a, b) => a.ratio - b.ratio || a.i - b.i);
  const rooms: Tranche['rooms'] = [];
  let capitalGbp = 0;
  let value = 0;
  let pupils = 0;
  for (const p of placed) {
    if (capitalGbp >= TRANCHE_GBP) break;
    const c = candidates[p.i]!;
    capitalGbp += p.capital;
    if (!shows(c.schoolId)) continue;
    value += c.pupilHoursRemovedPerYear;
    pupils += c.pupils;
    rooms.push(trancheRoom(c, p.year, p.capital));
  }
  const words =
    rooms.length === 0
      ? 'The plan has no rooms that were chosen on benefit (every room in it was forced in or pinned).'
      : `The last ${formatGbp(capitalGbp)} of the plan (its ${rooms.length} room${rooms.length === 1 ? '' : 's'} with the least benefit per pound) ` +
        `buys about ${formatInt(value)} pupil-hours of poor air removed a year for ${formatInt(pupils)} pupils ` +
        `(${formatOneDecimal(per1000(value, capitalGbp))} per £1,000).`;
  return { capitalGbp, pupilHoursRemovedPerYear: value, pupils, rooms, words };
}

function misses(args: ReportArgs, shows: (schoolId: string) => boolean): MissLine[] {
  const { built, assignment, settings } = args;
  const { problem, candidates } = built;
  const byId = built.byRoom;
  const maxCapacity = Math.max(0, ...problem.slots.map((s) => s.capacityUnits));
  // The weakest benefit per pound the plan bought, for "not reached" reasons.
  let cut = Number.POSITIVE_INFINITY;
  problem.items.forEach((item, i) => {
    const k = assignment[i]!;
    if (k < 0 || item.mustPlace) return;
    const capital = item.baseCostGbp * problem.costFactorByYear[problem.slots[k]!.year - 1]!;
    cut = Math.min(cut, per1000(item.value, capital));
  });
  const metric = settings.objective === 'rank_weights' ? 'ranking score points' : 'pupil-hours a year';
  const out: MissLine[] = [];
  const push = (c: ProgrammeCandidate, reason: MissLine['reason'], words: string) => {
    if (shows(c.schoolId))
      out.push({
        roomId: c.roomId,
        roomCode: c.roomCode,
        roomName: c.roomName,
        schoolId: c.schoolId,
        schoolName: c.schoolName,
        reason,
        words,
        pupilHoursRemovedPerYear: c.pupilHoursRemovedPerYear,
      });
  };
  for (const e of built.excluded) {
    const c = byId.get(e.roomId);
    if (!c) continue;
    const capital1 = onCostBreakdown(c.installedCostGbp, settings.onCosts, 1).chargedGbp;
    const words: Record<MissReason, string> = {
      kept_out: 'Kept out of the programme by the trust.',
      no_benefit:
        settings.objective === 'rank_weights'
          ? 'Its ranking score is zero under the trust’s weights.'
          : 'Its units would remove no pupil-hours of poor air (it meets its criterion, or the units do not change that).',
      too_many_units: `Needs ${c.units} units, more than any works window can fit (${maxCapacity} in the largest).`,
      costs_more_than_budget: `Costs ${formatGbp(capital1)} with on-costs, more than the capital of any year it may go in.`,
      heating_year_outside:
        'Its block’s heating is replaced after the programme ends; its ventilation waits for that project.',
      not_funded: '',
    };
    push(c, e.reason, words[e.reason]);
  }
  problem.items.forEach((item, i) => {
    if (assignment[i]! >= 0) return;
    const c = candidates[i]!;
    const ratio = per1000(item.value, item.baseCostGbp * problem.costFactorByYear[0]!);
    push(
      c,
      'not_funded',
      Number.isFinite(cut)
        ? `Not reached: ${formatOneDecimal(ratio)} ${metric} per £1,000, below what the money bought elsewhere (the plan's weakest room gives ${formatOneDecimal(cut)}), or no window had room when its turn came.`
        : 'Not reached: the capital ran out on rooms forced in or pinned.',
    );
  });
  for (const u of args.unplannable ?? [])
    if (shows(u.schoolId)) out.push({ ...u, reason: 'no_units_fit', words: u.reason, pupilHoursRemovedPerYear: 0 });
  return out.sort(
    (a, b) =>
      b.pupilHoursRemovedPerYear - a.pupilHoursRemovedPerYear ||
      a.schoolName.localeCompare(b.schoolName, 'en-GB') ||
      a.roomCode.localeCompare(b.roomCode, 'en-GB'),
  );
}

/** The label of a window id, re-exported for pages. */
export { WINDOW_LABELS };
