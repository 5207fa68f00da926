/**
 * The exact plan (HiGHS through its adapter) against enumeration: on small programmes every combination of
 * rooms, years and windows is tried by the test's own code (brute-force.ts), and the solver's plan must
 * reach the same best objective and keep every budget and window.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { MipSolver } from '~/lib/engine/programme/milp';
import { planProgramme } from '~/lib/engine/programme/plan';
import type { ProgrammeProblem } from '~/lib/engine/programme/types';
import { getHighsSolver } from '~/lib/server/programme/highs-solver';
import { bruteForce, check, EARLINESS, smallProblem } from './brute-force';

let solver: MipSolver;
beforeAll(async () => {
  solver = await getHighsSolver();
});

describe('the exact plan matches enumeration', () => {
  for (const seed of [1, 2, 3, 4, 5, 6, 7, 8]) {
    it(`finds the best plan of random small programme #${seed}`, () => {
      const problem = smallProblem(seed, 6, 2);
      const reference = bruteForce(problem);
      const { assignment, info } = planProgramme(problem, { solver });
      const objective = check(problem, [...assignment]);
      expect(objective, 'the plan keeps every budget and window').not.toBeNull();
      expect(info.method).toBe('exact');
      expect(objective!).toBeCloseTo(reference.best, 6);
      expect(info.bound).toBeGreaterThanOrEqual(reference.best - 1e-6);
    });
  }

  it('groups rooms of one school into one visit when the mobilisation makes that worth more', () => {
    // Two schools, one year, one window of 4 units, £20,000. School A has two rooms (value 60 each,
    // £5,000 each); school B one room (value 100, £9,000). A visit costs £4,000. B alone: 100 for
    // £13,000, plus one A room (£9,000) is £22,000 — over budget. Both A rooms: 120 for £14,000 and B does
    // not fit (£27,000). So the best plan is A's two rooms in one visit: 120 (worked by hand).
    const problem: ProgrammeProblem = {
      years: 1,
      slots: [{ index: 0, year: 1, windowId: 'summer', capacityUnits: 4 }],
      budgetsGbp: [20_000],
      costFactorByYear: [1],
      mobilisationGbp: 4000,
      schoolIds: ['A', 'B'],
      items: [
        {
          roomId: 'a1',
          school: 0,
          units: 1,
          baseCostGbp: 5000,
          value: 60,
          allowedSlots: [0],
          mustPlace: false,
          mobilisationWaived: false,
        },
        {
          roomId: 'a2',
          school: 0,
          units: 1,
          baseCostGbp: 5000,
          value: 60,
          allowedSlots: [0],
          mustPlace: false,
          mobilisationWaived: false,
        },
        {
          roomId: 'b1',
          school: 1,
          units: 1,
          baseCostGbp: 9000,
          value: 100,
          allowedSlots: [0],
          mustPlace: false,
          mobilisationWaived: false,
        },
      ],
      earlinessWeight: EARLINESS,
    };
    const { assignment, info } = planProgramme(problem, { solver });
    expect([...assignment]).toEqual([0, 0, -1]);
    expect(info.objective).toBeCloseTo(120, 9);
  });

  it('says when rooms forced in cannot fit, instead of breaking a budget', () => {
    const problem = smallProblem(11, 5, 1);
    for (const item of problem.items) item.mustPlace = true;
    problem.budgetsGbp = [5000];
    expect(() => planProgramme(problem, { solver })).toThrow(/forced in or pinned/);
  });

  it('gives the same plan for the same inputs', () => {
    const a = planProgramme(smallProblem(21, 7, 2), { solver });
    const b = planProgramme(smallProblem(21, 7, 2), { solver });
    expect([...a.assignment]).toEqual([...b.assignment]);
  });
});
