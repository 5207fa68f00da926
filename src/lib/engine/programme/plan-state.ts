/**
 * A plan being built: where each room is, what each year has spent, what each window holds and which school
 * visits are paid for. Placing and removing keep the sums right, so the heuristic never breaks a budget or a
 * window's capacity (it asks `fits` first).
 */
import type { Assignment, ProgrammeProblem } from './types';

export class PlanState {
  readonly assignment: Assignment;
  readonly spendByYearGbp: Float64Array;
  readonly unitsBySlot: Int32Array;
  /** Non-waived rooms of each school in each slot (a visit is paid while this is above 0). */
  readonly roomsInVisit: Int32Array;
  private readonly nSlots: number;

  constructor(readonly problem: ProgrammeProblem) {
    this.nSlots = problem.slots.length;
    this.assignment = new Int32Array(problem.items.length).fill(-1);
    this.spendByYearGbp = new Float64Array(problem.years);
    this.unitsBySlot = new Int32Array(this.nSlots);
    this.roomsInVisit = new Int32Array(problem.schoolIds.length * this.nSlots);
  }

  /** Capital charged for item `i` in slot `k`, with a new visit's mobilisation when one is needed (exceptRoom: as if it were gone). */
  costIn(i: number, k: number, exceptItem = -1): number {
    const item = this.problem.items[i]!;
    const year = this.problem.slots[k]!.year;
    const factor = this.problem.costFactorByYear[year - 1]!;
    let cost = item.baseCostGbp * factor;
    if (!item.mobilisationWaived) {
      let present = this.roomsInVisit[item.school * this.nSlots + k]!;
      if (exceptItem >= 0 && this.assignment[exceptItem] === k) {
        const other = this.problem.items[exceptItem]!;
        if (other.school === item.school && !other.mobilisationWaived) present -= 1;
      }
      if (present === 0) cost += this.problem.mobilisationGbp * factor;
    }
    return cost;
  }

  /** True when item `i` fits in slot `k` (budget and capacity) with `freedGbp` and `freedUnits` given back. */
  fits(i: number, k: number, freedGbp = 0, freedUnits = 0, exceptItem = -1): boolean {
    const slot = this.problem.slots[k]!;
    const item = this.problem.items[i]!;
    if (this.unitsBySlot[k]! - freedUnits + item.units > slot.capacityUnits) return false;
    const budget = this.problem.budgetsGbp[slot.year - 1]!;
    return this.spendByYearGbp[slot.year - 1]! - freedGbp + this.costIn(i, k, exceptItem) <= budget * (1 + 1e-12);
  }

  /** Visit school `school` is already paying for in slot `k`. */
  visited(school: number, k: number): boolean {
    return this.roomsInVisit[school * this.nSlots + k]! > 0;
  }

  /** A copy to try a change on. */
  clone(): PlanState {
    const copy = new PlanState(this.problem);
    copy.assignment.set(this.assignment);
    copy.spendByYearGbp.set(this.spendByYearGbp);
    copy.unitsBySlot.set(this.unitsBySlot);
    copy.roomsInVisit.set(this.roomsInVisit);
    return copy;
  }

  /** Takes over another state's plan (after a successful try). */
  adopt(other: PlanState): void {
    this.assignment.set(other.assignment);
    this.spendByYearGbp.set(other.spendByYearGbp);
    this.unitsBySlot.set(other.unitsBySlot);
    this.roomsInVisit.set(other.roomsInVisit);
  }

  /** Objective of the current plan. */
  objective(): number {
    let total = 0;
    const { items, slots, years, earlinessWeight } = this.problem;
    for (let i = 0; i < items.length; i++) {
      const k = this.assignment[i]!;
      if (k >= 0) total += items[i]!.value * (1 + earlinessWeight * (years - slots[k]!.year));
    }
    return total;
  }

  place(i: number, k: number): void {
    const cost = this.costIn(i, k);
    const item = this.problem.items[i]!;
    this.assignment[i] = k;
    this.spendByYearGbp[this.problem.slots[k]!.year - 1]! += cost;
    this.unitsBySlot[k]! += item.units;
    if (!item.mobilisationWaived) this.roomsInVisit[item.school * this.nSlots + k]! += 1;
  }

  remove(i: number): void {
    const k = this.assignment[i]!;
    if (k < 0) return;
    const item = this.problem.items[i]!;
    const slot = this.problem.slots[k]!;
    const factor = this.problem.costFactorByYear[slot.year - 1]!;
    let refund = item.baseCostGbp * factor;
    if (!item.mobilisationWaived) {
      const key = item.school * this.nSlots + k;
      this.roomsInVisit[key]! -= 1;
      if (this.roomsInVisit[key] === 0) refund += this.problem.mobilisationGbp * factor;
    }
    this.assignment[i] = -1;
    this.spendByYearGbp[slot.year - 1]! -= refund;
    this.unitsBySlot[k]! -= item.units;
  }
}
