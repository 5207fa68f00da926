/**
 * The exact model as a mixed-integer linear programme, in the sparse column form solvers take. Binary
 * x[i,k] puts room i in slot k (a window of a year); binary v[s,k] pays for a visit to school s in slot k.
 *
 *   maximise   Σ value_i · (1 + ε(N − year_k)) · x[i,k]
 *   subject to Σ_k x[i,k] ≤ 1                (= 1 for rooms forced in or pinned)      one row per room
 *              Σ cost_i·F_y x[i,k] + Σ mob·F_y v[s,k] ≤ budget_y                     one row per year
 *              Σ units_i x[i,k] ≤ capacity_k                                          one row per slot
 *              x[i,k] ≤ v[school(i),k]       (not for rooms joining a heating project) one row per x
 *
 * The per-room linking rows (rather than one aggregated row per visit) give the tighter LP relaxation.
 */
import { yearWeight } from './model';
import type { Assignment, ProgrammeProblem } from './types';

/** A MIP in compressed sparse column form; every column is binary. Objective is maximised. */
export interface MilpModel {
  numCols: number;
  numRows: number;
  colCost: Float64Array;
  rowLower: Float64Array;
  rowUpper: Float64Array;
  starts: Int32Array;
  indices: Int32Array;
  values: Float64Array;
}

/** What a MIP solver found. */
export interface MipResult {
  status: 'optimal' | 'limit' | 'infeasible' | 'failed';
  /** Objective of the best solution found, or null. */
  objective: number | null;
  /** The solver's proven upper bound on the optimum (for a maximisation), or null. */
  dualBound: number | null;
  colValues: Float64Array | null;
}

/** A MIP solver, called through an adapter (the engine never loads one itself). */
export interface MipSolver {
  solveMip(model: MilpModel, limits: { maxNodes: number; timeLimitS: number }): MipResult;
  /** The optimum of the LP relaxation (every column in [0, 1]), an upper bound on the MIP's; null if it failed. */
  solveLpRelaxation(model: MilpModel, limits: { timeLimitS: number }): number | null;
}

/** The model and how to read a solution back into an assignment. */
export interface BuiltMilp {
  model: MilpModel;
  /** Column j < xCount is x[xItem[j], xSlot[j]]. */
  xCount: number;
  xItem: Int32Array;
  xSlot: Int32Array;
}

/** Builds the MIP of `problem`. */
export function buildMilp(problem: ProgrammeProblem): BuiltMilp {
  const { items, slots, years } = problem;
  const nItems = items.length;
  const nSlots = slots.length;
  let xCount = 0;
  for (const item of items) xCount += item.allowedSlots.length;
  const xItem = new Int32Array(xCount);
  const xSlot = new Int32Array(xCount);
  // Visits: one column per (school, slot) that a room needing a visit could use.
  const visitCol = new Map<number, number>();
  const visitLinks: number[][] = [];
  let j = 0;
  let linkCount = 0;
  items.forEach((item, i) => {
    for (const k of item.allowedSlots) {
      xItem[j] = i;
      xSlot[j] = k;
      if (!item.mobilisationWaived) {
        const key = item.school * nSlots + k;
        let v = visitCol.get(key);
        if (v === undefined) {
          v = visitCol.size;
          visitCol.set(key, v);
          visitLinks.push([]);
        }
        visitLinks[v]!.push(linkCount++);
      }
      j++;
    }
  });
  const nVisits = visitCol.size;
  const numCols = xCount + nVisits;
  const rowItem0 = 0;
  const rowYear0 = nItems;
  const rowSlot0 = rowYear0 + years;
  const rowLink0 = rowSlot0 + nSlots;
  const numRows = rowLink0 + linkCount;

  const rowLower = new Float64Array(numRows).fill(Number.NEGATIVE_INFINITY);
  const rowUpper = new Float64Array(numRows);
  items.forEach((item, i) => {
    rowUpper[rowItem0 + i] = 1;
    if (item.mustPlace) rowLower[rowItem0 + i] = 1;
  });
  for (let y = 0; y < years; y++) rowUpper[rowYear0 + y] = problem.budgetsGbp[y]!;
  for (let k = 0; k < nSlots; k++) rowUpper[rowSlot0 + k] = slots[k]!.capacityUnits;
  // Link rows: x − v ≤ 0 (rowUpper already 0).

  const colCost = new Float64Array(numCols);
  const nnz = xCount * 3 + linkCount * 2 + nVisits;
  const starts = new Int32Array(numCols + 1);
  const indices = new Int32Array(nnz);
  const values = new Float64Array(nnz);
  let p = 0;
  let link = 0;
  for (let c = 0; c < xCount; c++) {
    starts[c] = p;
    const item = items[xItem[c]!]!;
    const slot = slots[xSlot[c]!]!;
    colCost[c] = item.value * yearWeight(problem, slot.year);
    indices[p] = rowItem0 + xItem[c]!;
    values[p++] = 1;
    indices[p] = rowYear0 + slot.year - 1;
    values[p++] = item.baseCostGbp * problem.costFactorByYear[slot.year - 1]!;
    indices[p] = rowSlot0 + slot.index;
    values[p++] = item.units;
    if (!item.mobilisationWaived) {
      indices[p] = rowLink0 + link++;
      values[p++] = 1;
    }
  }
  for (const [key, v] of visitCol) {
    const c = xCount + v;
    starts[c] = p;
    const slot = slots[key % nSlots]!;
    indices[p] = rowYear0 + slot.year - 1;
    values[p++] = problem.mobilisationGbp * problem.costFactorByYear[slot.year - 1]!;
    for (const l of visitLinks[v]!) {
      indices[p] = rowLink0 + l;
      values[p++] = -1;
    }
  }
  starts[numCols] = p;
  return {
    model: {
      numCols,
      numRows,
      colCost,
      rowLower,
      rowUpper,
      starts,
      indices: indices.subarray(0, p),
      values: values.subarray(0, p),
    },
    xCount,
    xItem,
    xSlot,
  };
}

/** Reads an assignment from a solution's column values (x above ½ is in). */
export function assignmentFromSolution(
  problem: ProgrammeProblem,
  milp: BuiltMilp,
  colValues: Float64Array,
): Assignment {
  const assignment = new Int32Array(problem.items.length).fill(-1);
  for (let c = 0; c < milp.xCount; c++) if (colValues[c]! > 0.5) assignment[milp.xItem[c]!] = milp.xSlot[c]!;
  return assignment;
}

/**
 * The same problem with each year's windows merged into one slot (capacity summed) and a school visit paid
 * once per year. Every plan of `problem` is a plan of this one at no greater cost, so its optimum is an upper
 * bound; when its best plan can be packed into the real windows with one visit per school and year, that plan
 * is also the best plan of `problem`.
 */
export function yearLevelProblem(problem: ProgrammeProblem): ProgrammeProblem {
  const slots = Array.from({ length: problem.years }, (_, y) => ({
    index: y,
    year: y + 1,
    windowId: 'summer' as const,
    capacityUnits: problem.slots.filter((s) => s.year === y + 1).reduce((n, s) => n + s.capacityUnits, 0),
  }));
  return {
    ...problem,
    slots,
    items: problem.items.map((item) => ({
      ...item,
      allowedSlots: [...new Set(item.allowedSlots.map((k) => problem.slots[k]!.year - 1))].sort((a, b) => a - b),
    })),
  };
}
