/**
 * The heuristic (used for estates too large to solve exactly) never breaks a budget or a window's capacity,
 * and the gap it reports is honest: its bound is at least the true best plan, found by enumeration in the
 * test, so the true shortfall is never larger than the gap it states.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { heuristicPlan } from '~/lib/engine/programme/heuristic';
import { planProgramme } from '~/lib/engine/programme/plan';
import { bruteForce, check, prng, smallProblem } from './brute-force';
import type { ProgrammeProblem } from '~/lib/engine/programme/types';

describe('the heuristic plan', () => {
  it('never breaks a budget or a window, on any small programme', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.integer({ min: 3, max: 7 }),
        fc.integer({ min: 1, max: 3 }),
        (seed, rooms, years) => {
          const problem = smallProblem(seed, rooms, years);
          expect(check(problem, [...heuristicPlan(problem)])).not.toBeNull();
        },
      ),
      { numRuns: 150 },
    );
  });

  it('reports a gap no smaller than its true shortfall from the best plan', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const problem = smallProblem(seed, 6, 2);
        const best = bruteForce(problem).best;
        const { assignment, info } = planProgramme(problem, { solver: null });
        const objective = check(problem, [...assignment]);
        expect(objective).not.toBeNull();
        expect(info.objective).toBeCloseTo(objective!, 6);
        // The bound is a bound: no plan beats it.
        expect(info.bound).toBeGreaterThanOrEqual(best - 1e-6);
        // The gap is (bound − plan) / bound, and at least the true shortfall (best − plan) / best.
        const stated = (100 * (info.bound - objective!)) / info.bound;
        expect(info.gapPct).toBeCloseTo(stated, 6);
        const trueGap = best > 0 ? (100 * (best - objective!)) / best : 0;
        expect(info.gapPct).toBeGreaterThanOrEqual(trueGap - 1e-6);
      }),
      { numRuns: 60 },
    );
  });

  it('keeps every budget and window on a larger estate (60 schools, 1,500 rooms, 4 years)', () => {
    const r = prng(99);
    const slots = Array.from({ length: 16 }, (_, index) => ({
      index,
      year: Math.floor(index / 4) + 1,
      windowId: (['october', 'february', 'easter', 'summer'] as const)[index % 4]!,
      capacityUnits: [20, 20, 32, 100][index % 4]!,
    }));
    const problem: ProgrammeProblem = {
      years: 4,
      slots,
      budgetsGbp: [900_000, 900_000, 600_000, 1_200_000],
      costFactorByYear: [1.35, 1.4, 1.45, 1.5],
      mobilisationGbp: 2000,
      schoolIds: Array.from({ length: 60 }, (_, s) => `s${s}`),
      items: Array.from({ length: 1500 }, (_, i) => {
        const units = 1 + Math.floor(r() * 3);
        return {
          roomId: `r${i}`,
          school: Math.floor(r() * 60),
          units,
          baseCostGbp: units * 6500,
          value: Math.round(r() * 3000),
          allowedSlots: slots.map((s) => s.index),
          mustPlace: i % 300 === 0,
          mobilisationWaived: i % 97 === 0,
        };
      }),
      earlinessWeight: 0.01,
    };
    const { assignment, info } = planProgramme(problem, { solver: null });
    expect(check(problem, [...assignment])).not.toBeNull();
    expect(info.gapPct).toBeGreaterThanOrEqual(0);
    expect(info.bound).toBeGreaterThanOrEqual(info.objective);
  }, 60_000); // a big plan: minutes of slack on a loaded machine, not a speed check

  it('gives the same plan for the same inputs', () => {
    const problem = smallProblem(5, 7, 3);
    expect([...heuristicPlan(problem)]).toEqual([...heuristicPlan(smallProblem(5, 7, 3))]);
  });
});

describe('each bound on its own', () => {
  it('the Lagrangian bound and the single-resource bounds are never below the best plan', async () => {
    const { lagrangianBound, resourceBounds } = await import('~/lib/engine/programme/bound');
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.integer({ min: 1, max: 3 }), (seed, years) => {
        const problem = smallProblem(seed, 6, years);
        const best = bruteForce(problem).best;
        expect(resourceBounds(problem)).toBeGreaterThanOrEqual(best - 1e-6);
        // From any prices, a Lagrangian value is an upper bound (weak duality); start it at a poor target.
        expect(lagrangianBound(problem, 0, 40).bound).toBeGreaterThanOrEqual(best - 1e-6);
      }),
      { numRuns: 80 },
    );
  });
});
