/**
 * A proven upper bound on the best possible plan, by Lagrangian relaxation (Held & Karp 1971; Geoffrion 1974;
 * Fisher 1981, "The Lagrangian relaxation method for solving integer programming problems", Management
 * Science 27(1)). Each year's budget and each window's capacity is moved into the objective with a price
 * (μ per pound, λ per unit); what is left splits into one small problem per school, solved exactly:
 * which years to visit the school (a visit is charged once per year — fewer than the plan pays, so this is
 * a relaxation) and which rooms to do in each. For any prices ≥ 0 the result is an upper bound (weak
 * duality); the prices are improved by projected subgradient steps with Polyak's step length (Polyak 1969)
 * and the lowest bound found is kept. With more than six programme years the school subproblem is relaxed
 * further to "at least one visit if any room is done", which is still a bound.
 */
import { yearWeight } from './model';
import type { ProgrammeProblem } from './types';

/** Prices of a pound of each year's budget (μ, index 0 = year 1) and of a unit of each slot's capacity (λ). */
export interface ResourcePrices {
  mu: Float64Array;
  lambda: Float64Array;
  /** Per school, the years (bit y−1) the relaxation visits it at these prices. */
  visitYears: Int32Array;
}

/** The bound and the prices that gave it. */
export interface LagrangianBound {
  bound: number;
  iterations: number;
  prices: ResourcePrices;
}

/** Years up to which the per-school subproblem enumerates every set of visit years. */
const EXACT_VISIT_YEARS = 6;

interface Workspace {
  /** Items of each school that need a visit, and items whose work joins a heating project. */
  bySchool: number[][];
  waived: number[];
  /** Per item and year: best profit and its slot (−1 when none). */
  profit: Float64Array;
  profitSlot: Int32Array;
  /** Years visited per school in the last evaluation. */
  visitYears: Int32Array;
  /** Flat copies of the items' numbers and allowed slots (CSR), for speed. */
  value: Float64Array;
  cost: Float64Array;
  units: Float64Array;
  must: Uint8Array;
  allowedStart: Int32Array;
  allowed: Int32Array;
  slotYear: Int32Array;
}

/**
 * The relaxation's value at prices μ (per year) and λ (per slot), with a subgradient: budget and capacity
 * left over by the relaxed solution (negative = overspent).
 */
function evaluate(
  problem: ProgrammeProblem,
  ws: Workspace,
  mu: Float64Array,
  lambda: Float64Array,
  gMu: Float64Array,
  gLambda: Float64Array,
): number {
  const { items, slots, years, costFactorByYear, mobilisationGbp } = problem;
  let value = 0;
  for (let y = 0; y < years; y++) {
    value += mu[y]! * problem.budgetsGbp[y]!;
    gMu[y] = problem.budgetsGbp[y]!;
  }
  for (let k = 0; k < slots.length; k++) {
    value += lambda[k]! * slots[k]!.capacityUnits;
    gLambda[k] = slots[k]!.capacityUnits;
  }
  const weights = Array.from({ length: years }, (_, y) => yearWeight(problem, y + 1));
  const { profit, profitSlot } = ws;
  // Per item and year, the best slot's profit after prices.
  for (let i = 0; i < items.length; i++) {
    const base = i * years;
    for (let y = 0; y < years; y++) {
      profit[base + y] = Number.NEGATIVE_INFINITY;
      profitSlot[base + y] = -1;
    }
    const v = ws.value[i]!;
    const c = ws.cost[i]!;
    const u = ws.units[i]!;
    for (let a = ws.allowedStart[i]!, end = ws.allowedStart[i + 1]!; a < end; a++) {
      const k = ws.allowed[a]!;
      const y = ws.slotYear[k]!;
      const p = v * weights[y]! - mu[y]! * c * costFactorByYear[y]! - lambda[k]! * u;
      if (p > profit[base + y]!) {
        profit[base + y] = p;
        profitSlot[base + y] = k;
      }
    }
  }
  const take = (i: number, y: number) => {
    const k = profitSlot[i * years + y]!;
    value += profit[i * years + y]!;
    gMu[y]! -= ws.cost[i]! * costFactorByYear[y]!;
    gLambda[k]! -= ws.units[i]!;
  };
  /** Best year of item i among the years in `mask`, or −1 (its profit is in bestP). */
  let bestP = 0;
  const bestYear = (i: number, mask: number) => {
    let best = -1;
    bestP = Number.NEGATIVE_INFINITY;
    for (let y = 0; y < years; y++) {
      if (!(mask & (1 << y))) continue;
      const p = profit[i * years + y]!;
      if (p > bestP) {
        bestP = p;
        best = y;
      }
    }
    return best;
  };
  const all = (1 << years) - 1;
  for (const i of ws.waived) {
    const y = bestYear(i, all);
    if (y >= 0 && (bestP > 0 || ws.must[i])) take(i, y);
  }
  const visitCost = Array.from({ length: years }, (_, y) => mu[y]! * mobilisationGbp * costFactorByYear[y]!);
  const exact = years <= EXACT_VISIT_YEARS;
  const subsets = exact ? 1 << years : 0;
  const sums = new Float64Array(Math.max(subsets, 1));
  const best = new Float64Array(Math.max(subsets, 1));
  for (let school = 0; school < ws.bySchool.length; school++) {
    const schoolItems = ws.bySchool[school]!;
    ws.visitYears[school] = 0;
    if (schoolItems.length === 0) continue;
    let mask = 0;
    if (exact) {
      // best[S] for one room: its best profit over the years in S (0 when it may stay out).
      sums.fill(0);
      for (const i of schoolItems) {
        const floor = ws.must[i] ? Number.NEGATIVE_INFINITY : 0;
        best[0] = floor;
        for (let s = 1; s < subsets; s++) {
          const low = s & -s;
          const y = 31 - Math.clz32(low);
          const p = profit[i * years + y]!;
          const rest = best[s ^ low]!;
          best[s] = Math.max(p, rest);
        }
        for (let s = 0; s < subsets; s++) sums[s]! += best[s]!;
      }
      let bestS = 0;
      let bestV = Number.NEGATIVE_INFINITY;
      for (let s = 0; s < subsets; s++) {
        let v = sums[s]!;
        for (let y = 0; y < years; y++) if (s & (1 << y)) v -= visitCost[y]!;
        if (v > bestV) {
          bestV = v;
          bestS = s;
        }
      }
      mask = bestS;
      ws.visitYears[school] = mask;
      for (let y = 0; y < years; y++)
        if (mask & (1 << y)) {
          value -= visitCost[y]!;
          gMu[y]! -= mobilisationGbp * costFactorByYear[y]!;
        }
    } else {
      // At least one visit is paid if any room is done: charge the cheapest year's visit once.
      let total = 0;
      let any = false;
      const must = schoolItems.some((i) => ws.must[i] === 1);
      for (const i of schoolItems) {
        bestYear(i, all);
        if (bestP > 0 || ws.must[i]) {
          total += bestP;
          any = true;
        }
      }
      let cheapY = 0;
      for (let y = 1; y < years; y++) if (visitCost[y]! < visitCost[cheapY]!) cheapY = y;
      if (any && (must || total - visitCost[cheapY]! > 0)) {
        mask = all;
        ws.visitYears[school] = 1 << cheapY;
        value -= visitCost[cheapY]!;
        gMu[cheapY]! -= mobilisationGbp * costFactorByYear[cheapY]!;
      }
    }
    if (mask === 0) continue;
    for (const i of schoolItems) {
      const y = bestYear(i, mask);
      if (y >= 0 && (bestP > 0 || ws.must[i])) take(i, y);
    }
  }
  return value;
}

/** The value of `sorted`'s entry at fraction `q` (0–1) of its length; 0 when empty. */
function quantile(values: number[], q: number): number {
  if (values.length === 0) return 0;
  values.sort((a, b) => a - b);
  return values[Math.min(values.length - 1, Math.floor(q * values.length))]!;
}

/**
 * Starting prices read from a feasible plan: where a year's money is (nearly) all spent, the benefit per pound
 * of its weakest rooms; where a window is (nearly) full, their benefit per unit; half of each where both bind.
 */
export function pricesFromPlan(problem: ProgrammeProblem, assignment: Int32Array): ResourcePrices {
  const { items, slots, years } = problem;
  const spend = new Float64Array(years);
  const units = new Float64Array(slots.length);
  const perGbp: number[][] = Array.from({ length: years }, () => []);
  const perUnit: number[][] = Array.from({ length: slots.length }, () => []);
  items.forEach((item, i) => {
    const k = assignment[i]!;
    if (k < 0) return;
    const y = slots[k]!.year - 1;
    const f = problem.costFactorByYear[y]!;
    spend[y]! += item.baseCostGbp * f;
    units[k]! += item.units;
    const v = item.value * yearWeight(problem, y + 1);
    if (item.mustPlace) return;
    if (item.baseCostGbp > 0) perGbp[y]!.push(v / (item.baseCostGbp * f));
    if (item.units > 0) perUnit[k]!.push(v / item.units);
  });
  const mu = new Float64Array(years);
  const lambda = new Float64Array(slots.length);
  for (let y = 0; y < years; y++) {
    const moneyBinds = spend[y]! >= 0.97 * problem.budgetsGbp[y]!;
    for (const s of slots) {
      if (s.year !== y + 1) continue;
      const full = units[s.index]! >= 0.95 * s.capacityUnits;
      if (full) lambda[s.index] = quantile(perUnit[s.index]!, 0.05) * (moneyBinds ? 0.5 : 1);
    }
    const anyFull = slots.some((s) => s.year === y + 1 && units[s.index]! >= 0.95 * s.capacityUnits);
    if (moneyBinds) mu[y] = quantile(perGbp[y]!, 0.05) * (anyFull ? 0.5 : 1);
  }
  return { mu, lambda, visitYears: new Int32Array(problem.schoolIds.length) };
}

/**
 * An upper bound on the objective of any feasible plan. `target` is the objective of a known plan (it
 * sets the step length); `iterations` bounds the work (the same inputs always give the same bound).
 */
export function lagrangianBound(
  problem: ProgrammeProblem,
  target: number,
  iterations = 250,
  start: ResourcePrices | null = null,
  /** Polyak step multiplier at the start, halved after `patience` steps without a lower bound. */
  schedule: { theta: number; patience: number } = { theta: 1, patience: 15 },
): LagrangianBound {
  const { items, slots, years } = problem;
  const nSchools = problem.schoolIds.length;
  const ws: Workspace = {
    bySchool: Array.from({ length: nSchools }, () => []),
    waived: [],
    profit: new Float64Array(items.length * years),
    profitSlot: new Int32Array(items.length * years),
    visitYears: new Int32Array(nSchools),
    value: Float64Array.from(items, (it) => it.value),
    cost: Float64Array.from(items, (it) => it.baseCostGbp),
    units: Float64Array.from(items, (it) => it.units),
    must: Uint8Array.from(items, (it) => (it.mustPlace ? 1 : 0)),
    allowedStart: new Int32Array(items.length + 1),
    allowed: new Int32Array(items.reduce((n, it) => n + it.allowedSlots.length, 0)),
    slotYear: Int32Array.from(slots, (s) => s.year - 1),
  };
  let a = 0;
  items.forEach((item, i) => {
    ws.allowedStart[i] = a;
    for (const k of item.allowedSlots) ws.allowed[a++] = k;
  });
  ws.allowedStart[items.length] = a;
  items.forEach((item, i) => {
    if (item.mobilisationWaived) ws.waived.push(i);
    else ws.bySchool[item.school]!.push(i);
  });
  if (items.length === 0)
    return {
      bound: 0,
      iterations: 0,
      prices: {
        mu: new Float64Array(years),
        lambda: new Float64Array(slots.length),
        visitYears: new Int32Array(nSchools),
      },
    };
  // Scale the step per dimension: pounds for budgets, units for capacities (a diagonal preconditioner).
  const meanCost = items.reduce((s, it) => s + it.baseCostGbp * problem.costFactorByYear[0]!, 0) / items.length || 1;
  const meanUnits = items.reduce((s, it) => s + it.units, 0) / items.length || 1;
  // Start the budget prices at the benefit per pound of the average room, capacity prices at zero.
  const meanValue = items.reduce((s, it) => s + it.value, 0) / items.length;
  const mu = start ? Float64Array.from(start.mu) : new Float64Array(years).fill(meanValue / meanCost);
  const lambda = start ? Float64Array.from(start.lambda) : new Float64Array(slots.length);
  const bestMu = Float64Array.from(mu);
  const bestLambda = Float64Array.from(lambda);
  const bestVisits = new Int32Array(nSchools);
  const gMu = new Float64Array(years);
  const gLambda = new Float64Array(slots.length);
  let bestBound = Number.POSITIVE_INFINITY;
  let theta = schedule.theta;
  let sinceBest = 0;
  let done = 0;
  for (; done < iterations; done++) {
    const value = evaluate(problem, ws, mu, lambda, gMu, gLambda);
    if (!Number.isFinite(bestBound) || value < bestBound - 1e-12 * Math.abs(bestBound)) {
      bestBound = value;
      sinceBest = 0;
      bestMu.set(mu);
      bestLambda.set(lambda);
      bestVisits.set(ws.visitYears);
    } else if (++sinceBest >= schedule.patience) {
      theta /= 2;
      sinceBest = 0;
    }
    let norm = 0;
    for (let y = 0; y < years; y++) {
      const g = gMu[y]! / meanCost;
      if (mu[y]! > 0 || g < 0) norm += g * g;
    }
    for (let k = 0; k < slots.length; k++) {
      const g = gLambda[k]! / meanUnits;
      if (lambda[k]! > 0 || g < 0) norm += g * g;
    }
    if (norm === 0 || bestBound - target <= 1e-9 * Math.max(1, Math.abs(target)) || theta < 1e-6) break;
    const step = (theta * (value - target)) / norm;
    for (let y = 0; y < years; y++) mu[y] = Math.max(0, mu[y]! - (step * gMu[y]!) / meanCost / meanCost);
    for (let k = 0; k < slots.length; k++)
      lambda[k] = Math.max(0, lambda[k]! - (step * gLambda[k]!) / meanUnits / meanUnits);
  }
  return {
    bound: Math.max(bestBound, target),
    iterations: done,
    prices: { mu: bestMu, lambda: bestLambda, visitYears: bestVisits },
  };
}

/**
 * Two bounds by sorting, each the exact optimum of a relaxation that keeps one resource: (a) window capacity
 * only — each year's windows pooled, budgets, visits and restrictions dropped; (b) money only — capacity,
 * visits and restrictions dropped. Both are transportation problems whose profit is a product (the room's
 * benefit per unit, or per pound, times the year's weight), for which filling the best years with the densest
 * rooms first is optimal (the Monge property; Hoffman 1963). Returns the lower of the two.
 */
export function resourceBounds(problem: ProgrammeProblem): number {
  const { items, years } = problem;
  const weight = (y: number) => yearWeight(problem, y + 1);
  const byWeight = Array.from({ length: years }, (_, y) => y).sort((a, b) => weight(b) - weight(a) || a - b);
  /** Fractional filling of the years (best weight first) with the densest rooms first. */
  const fill = (size: (i: number) => number, capacityByYear: number[]) => {
    let total = 0;
    const sized: number[] = [];
    for (let i = 0; i < items.length; i++) {
      if (size(i) > 0) sized.push(i);
      else total += items[i]!.value * weight(byWeight[0]!);
    }
    sized.sort((a, b) => items[b]!.value / size(b) - items[a]!.value / size(a) || a - b);
    let y = 0;
    let left = capacityByYear[byWeight[0]!] ?? 0;
    for (const i of sized) {
      let need = size(i);
      const density = items[i]!.value / need;
      while (need > 0 && y < byWeight.length) {
        const take = Math.min(need, left);
        total += density * weight(byWeight[y]!) * take;
        need -= take;
        left -= take;
        if (left <= 0) {
          y++;
          left = capacityByYear[byWeight[y]!] ?? 0;
        }
      }
      if (y >= byWeight.length) break;
    }
    return total;
  };
  const capacity = Array.from({ length: years }, (_, y) =>
    problem.slots.filter((s) => s.year === y + 1).reduce((n, s) => n + s.capacityUnits, 0),
  );
  const byUnits = fill((i) => items[i]!.units, capacity);
  // Money: each room measured in pounds at today's prices; a year holds its budget ÷ its cost factor of them.
  const byMoney = fill(
    (i) => items[i]!.baseCostGbp,
    problem.budgetsGbp.map((b, y) => b / problem.costFactorByYear[y]!),
  );
  return Math.min(byUnits, byMoney);
}
