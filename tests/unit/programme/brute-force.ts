/**
 * An independent reference for the programme tests: small problems made from a fixed-seed generator, a
 * feasibility check and the best plan found by trying every combination. Written apart from the engine's
 * evaluatePlan on purpose (the app is never its own oracle).
 */
import { prng } from '../../../scripts/seed/prng';
import type { ProgrammeProblem } from '~/lib/engine/programme/types';

export { prng };

/** Each year sooner is worth 1 % more (the rule the programme documents). */
export const EARLINESS = 0.01;

/** Spend per year, units per slot and objective of `choice` (slot index per item, −1 = out); null when infeasible. */
export function check(p: ProgrammeProblem, choice: readonly number[]): number | null {
  const spend = new Array<number>(p.years).fill(0);
  const units = new Array<number>(p.slots.length).fill(0);
  const visits = new Set<string>();
  let objective = 0;
  for (let i = 0; i < p.items.length; i++) {
    const item = p.items[i]!;
    const k = choice[i]!;
    if (k === -1) {
      if (item.mustPlace) return null;
      continue;
    }
    if (!item.allowedSlots.includes(k)) return null;
    const slot = p.slots[k]!;
    const factor = p.costFactorByYear[slot.year - 1]!;
    spend[slot.year - 1]! += item.baseCostGbp * factor;
    units[k]! += item.units;
    if (!item.mobilisationWaived) {
      const key = `${item.school}@${k}`;
      if (!visits.has(key)) {
        visits.add(key);
        spend[slot.year - 1]! += p.mobilisationGbp * factor;
      }
    }
    objective += item.value * (1 + EARLINESS * (p.years - slot.year));
  }
  for (let y = 0; y < p.years; y++) if (spend[y]! > p.budgetsGbp[y]! + 1e-6) return null;
  for (let k = 0; k < p.slots.length; k++) if (units[k]! > p.slots[k]!.capacityUnits) return null;
  return objective;
}

/** The best objective over every combination (−Infinity when none is feasible). */
export function bruteForce(p: ProgrammeProblem): { best: number; choice: number[] } {
  const choice = new Array<number>(p.items.length).fill(-1);
  let best = Number.NEGATIVE_INFINITY;
  let bestChoice: number[] = [];
  const walk = (i: number) => {
    if (i === p.items.length) {
      const v = check(p, choice);
      if (v !== null && v > best) {
        best = v;
        bestChoice = [...choice];
      }
      return;
    }
    for (const k of [-1, ...p.items[i]!.allowedSlots]) {
      choice[i] = k;
      walk(i + 1);
    }
    choice[i] = -1;
  };
  walk(0);
  return { best, choice: bestChoice };
}

/** A random small problem: `rooms` rooms in up to three schools, `years` years of two windows each. */
export function smallProblem(seed: number, rooms = 6, years = 2): ProgrammeProblem {
  const r = prng(seed);
  const slots = Array.from({ length: years * 2 }, (_, index) => ({
    index,
    year: Math.floor(index / 2) + 1,
    windowId: index % 2 === 0 ? ('easter' as const) : ('summer' as const),
    capacityUnits: index % 2 === 0 ? 2 + Math.floor(r() * 2) : 3 + Math.floor(r() * 4),
  }));
  const items = Array.from({ length: rooms }, (_, i) => {
    const units = 1 + Math.floor(r() * 3);
    const allowed = slots.filter((s) => s.capacityUnits >= units).map((s) => s.index);
    return {
      roomId: `room-${i}`,
      school: Math.floor(r() * 3),
      units,
      baseCostGbp: units * (4000 + Math.round(r() * 3000)),
      value: Math.round(100 + r() * 2000),
      allowedSlots: allowed,
      mustPlace: false,
      mobilisationWaived: r() < 0.15,
    };
  }).filter((it) => it.allowedSlots.length > 0);
  return {
    years,
    slots,
    budgetsGbp: Array.from({ length: years }, () => 12_000 + Math.round(r() * 14_000)),
    costFactorByYear: Array.from({ length: years }, (_, y) => 1.3 * 1.035 ** y),
    mobilisationGbp: 1000 + Math.round(r() * 2000),
    schoolIds: ['a', 'b', 'c'],
    items,
    earlinessWeight: EARLINESS,
  };
}
