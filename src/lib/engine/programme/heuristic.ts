/**
 * The plan for estates too large to solve exactly: a benefit-per-pound greedy with school grouping, then
 * local improvement. Deterministic (every order has a tie-break on the room's position, which is room-id
 * order), and it never breaks a budget or a window's capacity: every placement is checked first.
 *
 * 1. Rooms that must be in (forced in or pinned) are placed first, those with fewest choices first.
 * 2. Year by year, earliest first, a lazy greedy takes the best next "package" by benefit per priced
 *    resource — the ratio rule for knapsack problems (Dantzig 1957) — where a package is either the next room
 *    of a school already visited that year, or the best-ratio group of rooms of a school not yet visited,
 *    carrying the visit's mobilisation (so a visit is paid only where enough rooms justify it). Resources are
 *    priced in pounds at first; later rounds price money and window capacity with the Lagrangian bound's
 *    multipliers (Magazine & Oguz 1984 use multipliers so for multi-resource knapsacks).
 * 3. Improvement: merge two visits to one school in the same year when one window can take both (saving a
 *    mobilisation), drop the weakest school visits and refill their year without them (kept only when better), swap a funded room for an unfunded one of greater benefit where the year's money and the
 *    window allow, and fill whatever money and capacity is left, earliest year first.
 */
import type { ResourcePrices } from './bound';
import { ProgrammeInfeasibleError } from './errors';
import { PlanState } from './plan-state';
import type { Assignment, ProgrammeProblem } from './types';

/** How many rooms at each end of a year the swap step compares (bounds its cost on large estates). */
const SWAP_CANDIDATES = 200;

/** Price of a pound and of a unit of capacity in one year. */
interface YearPrices {
  perGbp: number;
  perUnit: number;
  /** Schools a new visit may go to this year (null: any). */
  visitSchools: ((school: number) => boolean) | null;
}

/** How many school visits the visit-removal step tries to drop, and the largest estate it runs on (rooms). */
const VISIT_TRIALS = 60;
const VISIT_SEARCH_MAX_ROOMS = 5000;

/** The slot item `i` goes into: earliest year it fits (within `onlyYear` when given), a visited window first; −1 when nothing fits. */
function chooseSlot(state: PlanState, i: number, onlyYear = 0): number {
  const { problem } = state;
  const item = problem.items[i]!;
  let best = -1;
  let bestYear = Number.POSITIVE_INFINITY;
  for (const k of item.allowedSlots) {
    const year = problem.slots[k]!.year;
    if (onlyYear && year !== onlyYear) continue;
    if (year > bestYear) break;
    if (!state.fits(i, k)) continue;
    const free = item.mobilisationWaived || state.visited(item.school, k);
    if (best < 0) {
      best = k;
      bestYear = year;
      if (free) break;
    } else if (free) {
      best = k;
      break;
    }
  }
  return best;
}

/** Places must-place items; throws ProgrammeInfeasibleError naming those that fit nowhere. */
function placeFixed(state: PlanState): void {
  const { items } = state.problem;
  const fixed = items
    .map((_, i) => i)
    .filter((i) => items[i]!.mustPlace)
    .sort((a, b) => items[a]!.allowedSlots.length - items[b]!.allowedSlots.length || a - b);
  const failed: string[] = [];
  for (const i of fixed) {
    const k = chooseSlot(state, i);
    if (k < 0) failed.push(items[i]!.roomId);
    else state.place(i, k);
  }
  if (failed.length > 0)
    throw new ProgrammeInfeasibleError(
      failed,
      `${failed.length} room(s) forced in or pinned do not fit in any window they may use within its year's budget and capacity`,
    );
}

/** A candidate step of the yearly greedy: rooms to add together into one window, and their ratio. */
interface Option {
  group: number;
  ratio: number;
  rooms: number[];
  slot: number;
}

/** A binary max-heap of options by ratio (ties: lower group first, so the order is fixed). */
class OptionHeap {
  private readonly heap: Option[] = [];
  get size() {
    return this.heap.length;
  }
  private before(a: Option, b: Option) {
    return a.ratio > b.ratio || (a.ratio === b.ratio && a.group < b.group);
  }
  push(o: Option) {
    const h = this.heap;
    h.push(o);
    let i = h.length - 1;
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (!this.before(h[i]!, h[p]!)) break;
      [h[i], h[p]] = [h[p]!, h[i]!];
      i = p;
    }
  }
  pop(): Option | undefined {
    const h = this.heap;
    const top = h[0];
    const last = h.pop();
    if (h.length > 0 && last) {
      h[0] = last;
      let i = 0;
      for (;;) {
        const l = 2 * i + 1;
        const r = l + 1;
        let m = i;
        if (l < h.length && this.before(h[l]!, h[m]!)) m = l;
        if (r < h.length && this.before(h[r]!, h[m]!)) m = r;
        if (m === i) break;
        [h[i], h[m]] = [h[m]!, h[i]!];
        i = m;
      }
    }
    return top;
  }
}

/**
 * Fills year `year` by the package greedy described above. A new visit goes into the window of the year with
 * the most capacity left (so the school's later rooms can join it); a further room of a visited school goes
 * into a window where the school already is.
 */
function fillYear(state: PlanState, year: number, prices: YearPrices): void {
  const { problem } = state;
  const f = problem.costFactorByYear[year - 1]!;
  const yearSlots = problem.slots.filter((s) => s.year === year).map((s) => s.index);
  if (yearSlots.length === 0) return;
  const budget = problem.budgetsGbp[year - 1]!;
  const priced = (gbp: number, units: number) => prices.perGbp * gbp * f + prices.perUnit * units;
  const ratioOf = (value: number, used: number) => (used > 0 ? value / used : Number.POSITIVE_INFINITY);
  const capLeft = (k: number) => problem.slots[k]!.capacityUnits - state.unitsBySlot[k]!;

  // Groups: one per school (rooms needing a visit), one per room joining a heating project.
  const groups: { school: number; waived: boolean; rooms: number[] }[] = [];
  const bySchool = new Map<number, number>();
  problem.items.forEach((item, i) => {
    if (item.mustPlace || state.assignment[i]! >= 0) return;
    if (!item.allowedSlots.some((k) => problem.slots[k]!.year === year)) return;
    if (item.mobilisationWaived) {
      groups.push({ school: item.school, waived: true, rooms: [i] });
      return;
    }
    let g = bySchool.get(item.school);
    if (g === undefined) {
      g = groups.length;
      bySchool.set(item.school, g);
      groups.push({ school: item.school, waived: false, rooms: [] });
    }
    groups[g]!.rooms.push(i);
  });
  const roomRatio = (i: number) => {
    const item = problem.items[i]!;
    return ratioOf(item.value, priced(item.baseCostGbp, item.units));
  };
  for (const g of groups) g.rooms.sort((a, b) => roomRatio(b) - roomRatio(a) || a - b);

  const evaluate = (gi: number): Option | null => {
    const g = groups[gi]!;
    const left = budget - state.spendByYearGbp[year - 1]!;
    // Rooms placed, or dearer than all the money left, drop out for the rest of the year (money only shrinks).
    let kept = 0;
    for (const i of g.rooms)
      if (state.assignment[i]! < 0 && problem.items[i]!.baseCostGbp * f <= left) g.rooms[kept++] = i;
    g.rooms.length = kept;
    let best: Option | null = null;
    // A further room where the school is already visited (or a room needing no visit): no mobilisation.
    for (const i of g.rooms) {
      if (state.assignment[i]! >= 0) continue;
      const item = problem.items[i]!;
      if (item.baseCostGbp * f > left) continue;
      let slot = -1;
      for (const k of item.allowedSlots) {
        if (problem.slots[k]!.year !== year || capLeft(k) < item.units) continue;
        if (!g.waived && !state.visited(g.school, k)) continue;
        if (slot < 0 || capLeft(k) > capLeft(slot)) slot = k;
      }
      if (slot >= 0) {
        best = { group: gi, ratio: roomRatio(i), rooms: [i], slot };
        break;
      }
    }
    if (g.waived || (prices.visitSchools && !prices.visitSchools(g.school))) return best;
    // A new visit: into the window with most capacity left, the best-ratio group of rooms that fits there.
    let slot = -1;
    for (const k of yearSlots) if (!state.visited(g.school, k) && (slot < 0 || capLeft(k) > capLeft(slot))) slot = k;
    if (slot < 0) return best;
    let value = 0;
    let gbp = problem.mobilisationGbp;
    let units = 0;
    const taken: number[] = [];
    for (const i of g.rooms) {
      if (state.assignment[i]! >= 0) continue;
      const item = problem.items[i]!;
      if (!item.allowedSlots.includes(slot)) continue;
      if ((gbp + item.baseCostGbp) * f > left || units + item.units > capLeft(slot)) continue;
      value += item.value;
      gbp += item.baseCostGbp;
      units += item.units;
      taken.push(i);
      const ratio = ratioOf(value, priced(gbp, units));
      if (!best || ratio > best.ratio) best = { group: gi, ratio, rooms: [...taken], slot };
    }
    return best;
  };

  const heap = new OptionHeap();
  groups.forEach((_, gi) => {
    const o = evaluate(gi);
    if (o) heap.push(o);
  });
  while (heap.size > 0) {
    const top = heap.pop()!;
    const fresh = evaluate(top.group);
    if (!fresh) continue;
    if (fresh.ratio < top.ratio - 1e-12 * Math.abs(top.ratio)) {
      heap.push(fresh);
      continue;
    }
    for (const i of fresh.rooms) if (state.fits(i, fresh.slot)) state.place(i, fresh.slot);
    const next = evaluate(top.group);
    if (next) heap.push(next);
  }
}

/** Merges two visits to one school in the same year into one window where capacity allows (saves a mobilisation). */
function mergeVisits(state: PlanState): void {
  const { problem } = state;
  const bySchoolYear = new Map<string, Map<number, number[]>>();
  problem.items.forEach((item, i) => {
    const k = state.assignment[i]!;
    if (k < 0 || item.mobilisationWaived) return;
    const key = `${item.school}:${problem.slots[k]!.year}`;
    const slots = bySchoolYear.get(key) ?? new Map<number, number[]>();
    const list = slots.get(k) ?? [];
    list.push(i);
    slots.set(k, list);
    bySchoolYear.set(key, slots);
  });
  for (const slots of bySchoolYear.values()) {
    if (slots.size < 2) continue;
    const visits = [...slots.entries()].sort((a, b) => a[1].length - b[1].length || a[0] - b[0]);
    const moving = visits[0]![1];
    for (const [toSlot] of visits.slice(1)) {
      const units = moving.reduce((n, i) => n + problem.items[i]!.units, 0);
      const allowed = moving.every((i) => problem.items[i]!.allowedSlots.includes(toSlot));
      if (!allowed || state.unitsBySlot[toSlot]! + units > problem.slots[toSlot]!.capacityUnits) continue;
      // Same year, same cost factor: the move frees one mobilisation, so the budget can only improve.
      for (const i of moving) state.remove(i);
      for (const i of moving) state.place(i, toSlot);
      break;
    }
  }
}

/** Refund of taking item `i` out: its capital and, if it is the last room of its visit, the visit's mobilisation. */
function refundOf(state: PlanState, i: number): number {
  const { problem } = state;
  const k = state.assignment[i]!;
  const item = problem.items[i]!;
  const factor = problem.costFactorByYear[problem.slots[k]!.year - 1]!;
  let refund = item.baseCostGbp * factor;
  if (!item.mobilisationWaived && state.roomsInVisit[item.school * problem.slots.length + k] === 1)
    refund += problem.mobilisationGbp * factor;
  return refund;
}

/** Swaps a funded room for an unfunded one of greater benefit in the same year where money and window allow. */
function swapAtMargin(state: PlanState): boolean {
  const { problem } = state;
  let improved = false;
  for (let year = 1; year <= problem.years; year++) {
    const placed: number[] = [];
    const unplaced: number[] = [];
    problem.items.forEach((item, i) => {
      const k = state.assignment[i]!;
      if (k >= 0) {
        if (!item.mustPlace && problem.slots[k]!.year === year) placed.push(i);
      } else if (item.allowedSlots.some((s) => problem.slots[s]!.year === year)) unplaced.push(i);
    });
    placed.sort((a, b) => problem.items[a]!.value - problem.items[b]!.value || a - b);
    unplaced.sort((a, b) => problem.items[b]!.value - problem.items[a]!.value || a - b);
    const out = placed.slice(0, SWAP_CANDIDATES);
    const taken = new Set<number>();
    for (const j of unplaced.slice(0, SWAP_CANDIDATES)) {
      const vj = problem.items[j]!.value;
      let done = false;
      for (const i of out) {
        if (taken.has(i)) continue;
        if (problem.items[i]!.value >= vj) break;
        const ki = state.assignment[i]!;
        const refund = refundOf(state, i);
        for (const k of problem.items[j]!.allowedSlots) {
          if (problem.slots[k]!.year !== year) continue;
          const freedUnits = k === ki ? problem.items[i]!.units : 0;
          if (!state.fits(j, k, refund, freedUnits, i)) continue;
          state.remove(i);
          state.place(j, k);
          taken.add(i);
          done = true;
          improved = true;
          break;
        }
        if (done) break;
      }
    }
  }
  return improved;
}

/** Adds whatever still fits anywhere, best benefit per pound first, earliest year first. */
function fillAnywhere(state: PlanState): void {
  const { problem } = state;
  const order = problem.items
    .map((_, i) => i)
    .filter((i) => state.assignment[i]! < 0)
    .sort((a, b) => {
      const ia = problem.items[a]!;
      const ib = problem.items[b]!;
      return ib.value / (ib.baseCostGbp || 1) - ia.value / (ia.baseCostGbp || 1) || a - b;
    });
  for (const i of order) {
    const k = chooseSlot(state, i);
    if (k >= 0) state.place(i, k);
  }
}

/**
 * Large-neighbourhood search over visits ("ruin and recreate", Schrimpf et al. 2000): for each of the weakest
 * visits, take its rooms out, keep that school out of that year, refill the year by the package greedy, and
 * keep the result only if the plan's objective rises.
 */
function dropWeakVisits(state: PlanState, prices: ResourcePrices | null): void {
  const { problem } = state;
  const visits: { school: number; year: number; rooms: number[]; ratio: number }[] = [];
  const byKey = new Map<string, number>();
  problem.items.forEach((item, i) => {
    const k = state.assignment[i]!;
    if (k < 0 || item.mobilisationWaived) return;
    const year = problem.slots[k]!.year;
    const key = `${item.school}:${year}`;
    let v = byKey.get(key);
    if (v === undefined) {
      v = visits.length;
      byKey.set(key, v);
      visits.push({ school: item.school, year, rooms: [], ratio: 0 });
    }
    visits[v]!.rooms.push(i);
  });
  for (const v of visits) {
    if (v.rooms.some((i) => problem.items[i]!.mustPlace)) {
      v.ratio = Number.POSITIVE_INFINITY;
      continue;
    }
    const value = v.rooms.reduce((s, i) => s + problem.items[i]!.value, 0);
    const cost = v.rooms.reduce((s, i) => s + problem.items[i]!.baseCostGbp, problem.mobilisationGbp);
    v.ratio = value / (cost || 1);
  }
  const weakest = visits
    .map((v, index) => ({ v, index }))
    .filter(({ v }) => Number.isFinite(v.ratio))
    .sort((a, b) => a.v.ratio - b.v.ratio || a.index - b.index)
    .slice(0, VISIT_TRIALS);
  for (const { v } of weakest) {
    if (v.rooms.some((i) => state.assignment[i]! < 0)) continue;
    const before = state.objective();
    const trial = state.clone();
    for (const i of v.rooms) trial.remove(i);
    const base = yearPrices(problem, prices, v.year);
    const allowed = base.visitSchools;
    fillYear(trial, v.year, {
      ...base,
      visitSchools: (school) => school !== v.school && (!allowed || allowed(school)),
    });
    fillYear(trial, v.year, { ...base, visitSchools: (school) => school !== v.school });
    if (trial.objective() > before * (1 + 1e-12)) state.adopt(trial);
  }
}

/** Money and capacity prices per year from the bound's multipliers (capacity: the mean over the year's windows). */
function yearPrices(problem: ProgrammeProblem, prices: ResourcePrices | null, year: number): YearPrices {
  if (!prices) return { perGbp: 1, perUnit: 0, visitSchools: null };
  let sum = 0;
  let cap = 0;
  for (const s of problem.slots)
    if (s.year === year) {
      sum += prices.lambda[s.index]! * s.capacityUnits;
      cap += s.capacityUnits;
    }
  const bit = 1 << (year - 1);
  return {
    perGbp: prices.mu[year - 1]!,
    perUnit: cap > 0 ? sum / cap : 0,
    visitSchools: (school) => (prices.visitYears[school]! & bit) !== 0,
  };
}

/**
 * A feasible plan for `problem` by the greedy and improvement steps above; `prices` (from the bound) price
 * money and capacity when given, pounds alone otherwise.
 */
export function heuristicPlan(problem: ProgrammeProblem, prices: ResourcePrices | null = null): Assignment {
  const state = new PlanState(problem);
  placeFixed(state);
  for (let year = 1; year <= problem.years; year++) fillYear(state, year, yearPrices(problem, prices, year));
  // With a guide, the visits it chose are filled first; then any school may get a visit with what is left.
  if (prices)
    for (let year = 1; year <= problem.years; year++)
      fillYear(state, year, { ...yearPrices(problem, prices, year), visitSchools: null });
  for (let round = 0; round < 3; round++) {
    mergeVisits(state);
    if (problem.items.length <= VISIT_SEARCH_MAX_ROOMS) dropWeakVisits(state, prices);
    fillAnywhere(state);
    const swapped = swapAtMargin(state);
    fillAnywhere(state);
    if (!swapped) break;
  }
  return state.assignment;
}
