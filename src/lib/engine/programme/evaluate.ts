/**
 * Checks a plan against its problem and adds it up: spend per year (rooms and visits, with on-costs), units
 * per window, the school visits it needs, and the objective. The one place feasibility is judged.
 */
import { yearWeight } from './model';
import type { Assignment, ProgrammeProblem } from './types';

/** What a plan spends and uses, and whether it keeps every rule. */
export interface PlanEvaluation {
  objective: number;
  /** Benefit a year once done, without the earliness weight. */
  value: number;
  spendByYearGbp: number[];
  unitsBySlot: number[];
  /** Visits (school × slot) that pay mobilisation. */
  visits: { school: number; slot: number }[];
  violations: string[];
}

/** Relative slack allowed on budgets, for rounding in sums of money. */
const BUDGET_TOLERANCE = 1e-9;

/** Key of a school visit in a slot. */
export const visitKey = (school: number, slot: number, slots: number) => school * slots + slot;

/** Adds up and checks `assignment` (slot index per item, −1 = not in the plan). */
export function evaluatePlan(problem: ProgrammeProblem, assignment: Assignment): PlanEvaluation {
  const nSlots = problem.slots.length;
  const spendByYearGbp = new Array<number>(problem.years).fill(0);
  const unitsBySlot = new Array<number>(nSlots).fill(0);
  const visited = new Set<number>();
  const visits: PlanEvaluation['visits'] = [];
  const violations: string[] = [];
  let objective = 0;
  let value = 0;
  problem.items.forEach((item, i) => {
    const k = assignment[i] ?? -1;
    if (k < 0) {
      if (item.mustPlace) violations.push(`room ${item.roomId} must be in the plan`);
      return;
    }
    if (!item.allowedSlots.includes(k)) violations.push(`room ${item.roomId} is in a slot it may not use`);
    const slot = problem.slots[k]!;
    spendByYearGbp[slot.year - 1]! += item.baseCostGbp * problem.costFactorByYear[slot.year - 1]!;
    unitsBySlot[k]! += item.units;
    objective += item.value * yearWeight(problem, slot.year);
    value += item.value;
    if (!item.mobilisationWaived) {
      const key = visitKey(item.school, k, nSlots);
      if (!visited.has(key)) {
        visited.add(key);
        visits.push({ school: item.school, slot: k });
        spendByYearGbp[slot.year - 1]! += problem.mobilisationGbp * problem.costFactorByYear[slot.year - 1]!;
      }
    }
  });
  spendByYearGbp.forEach((spend, y) => {
    const budget = problem.budgetsGbp[y]!;
    if (spend > budget * (1 + BUDGET_TOLERANCE) + 1e-6) violations.push(`year ${y + 1} spends more than its budget`);
  });
  unitsBySlot.forEach((units, k) => {
    if (units > problem.slots[k]!.capacityUnits) violations.push(`slot ${k} has more units than it can fit`);
  });
  return { objective, value, spendByYearGbp, unitsBySlot, visits, violations };
}

/** The gap between a plan's objective and an upper bound, % of the bound (0 when the bound is 0). */
export function gapPct(objective: number, bound: number): number {
  if (!(bound > 0)) return 0;
  return Math.max(0, (100 * (bound - objective)) / bound);
}
