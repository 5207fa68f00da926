/**
 * Plans a programme. The heuristic (guided by the Lagrangian bound's prices) always runs; the HiGHS solver,
 * through its adapter, then solves the exact MIP where the model is small enough to prove optimality in
 * seconds, and the LP relaxation where that is affordable, so every plan carries a proven upper bound and its
 * gap: the lowest of the solver's MIP dual bound, the LP relaxation and the Lagrangian bound.
 * Deterministic: the solver runs with a node limit and a fixed seed (its time limit is only a safety net and
 * is reported when reached); the heuristic and the bound have fixed orders and iteration counts.
 */
import { lagrangianBound, pricesFromPlan, type ResourcePrices, resourceBounds } from './bound';
import { ProgrammeInfeasibleError } from './errors';
import { evaluatePlan, gapPct } from './evaluate';
import { heuristicPlan } from './heuristic';
import { assignmentFromSolution, buildMilp, type MipSolver } from './milp';
import type { Assignment, ProgrammeProblem, SolveInfo } from './types';

/** A gap below which the planner stops improving the heuristic plan, %. */
const GOOD_ENOUGH_GAP_PCT = 0.05;
/** Subgradient steps per run of the Lagrangian bound. */
const LAGRANGIAN_ITERATIONS = 250;

/** Largest number of room-in-window choices solved as an exact MIP by default (HiGHS proves these in seconds). */
export const EXACT_MAX_COLUMNS = 300;
/** Largest number of room-in-window choices whose LP relaxation is solved for the bound (about a second or two). */
export const LP_MAX_COLUMNS = 20_000;

export interface PlanOptions {
  /** The MIP solver (HiGHS through its adapter); null plans and bounds without it. */
  solver: MipSolver | null;
  exactMaxColumns?: number;
  lpMaxColumns?: number;
  /** Branch-and-bound node limit (deterministic). */
  maxNodes?: number;
  /** Safety limit on each solver call, s. */
  timeLimitS?: number;
  /** Clock for the reported seconds only. */
  now?: () => number;
}

export interface PlanResult {
  assignment: Assignment;
  info: SolveInfo;
}

/**
 * Heuristic plans guided by the bound's prices. The bound runs from three starts — neutral prices, where that
 * run ended, and prices read off the first plan (each converges best in a different case: money or capacity
 * binding); the lowest bound and the best plan are kept.
 */
function priceGuidedPlan(problem: ProgrammeProblem) {
  let assignment = heuristicPlan(problem);
  let objective = evaluatePlan(problem, assignment).objective;
  const simple = resourceBounds(problem);
  let bound = simple;
  let boundMethod: SolveInfo['boundMethod'] = 'resource_relaxation';
  const fromPlan = pricesFromPlan(problem, assignment);
  let previous: ResourcePrices | null = null;
  const runs = [
    { start: () => null, schedule: { theta: 1, patience: 15 } },
    { start: () => previous, schedule: { theta: 1, patience: 15 } },
    { start: () => fromPlan, schedule: { theta: 2, patience: 20 } },
  ];
  for (const run of runs) {
    // Close enough already: more rounds could not change the plan's quality by anything that matters.
    if (gapPct(objective, bound) <= GOOD_ENOUGH_GAP_PCT) break;
    const relaxed = lagrangianBound(problem, objective, LAGRANGIAN_ITERATIONS, run.start(), run.schedule);
    previous = relaxed.prices;
    if (relaxed.bound < bound) {
      bound = relaxed.bound;
      boundMethod = 'lagrangian';
    }
    const guided = heuristicPlan(problem, relaxed.prices);
    const guidedObjective = evaluatePlan(problem, guided).objective;
    if (guidedObjective > objective + 1e-9) {
      assignment = guided;
      objective = guidedObjective;
    }
  }
  return { assignment, objective, bound, boundMethod };
}

const pct = (v: number) => `${v < 0.1 ? v.toFixed(2) : v.toFixed(1)} %`;
const count = (n: number) => n.toLocaleString('en-GB');

const BOUND_WORDS: Record<SolveInfo['boundMethod'], string> = {
  solver_dual_bound: "the HiGHS solver's proven bound",
  lp_relaxation: 'the LP relaxation solved by HiGHS',
  lagrangian: 'a Lagrangian relaxation of the budgets and window capacities',
  resource_relaxation: 'the LP relaxation keeping only the money or only the window capacity, solved exactly',
};

/** The best plan this module can find for `problem`, with its bound and gap. */
export function planProgramme(problem: ProgrammeProblem, options: PlanOptions): PlanResult {
  const now = options.now ?? (() => Date.now());
  const started = now();
  const columns = problem.items.reduce((n, item) => n + item.allowedSlots.length, 0);
  const { solver } = options;
  const timeLimitS = options.timeLimitS ?? 30;

  let assignment: Assignment | null = null;
  let objective = Number.NEGATIVE_INFINITY;
  let bound = Number.POSITIVE_INFINITY;
  let boundMethod: SolveInfo['boundMethod'] = 'lagrangian';
  let infeasible: ProgrammeInfeasibleError | null = null;
  try {
    const guided = priceGuidedPlan(problem);
    assignment = guided.assignment;
    objective = guided.objective;
    bound = guided.bound;
    boundMethod = guided.boundMethod;
  } catch (error) {
    if (!(error instanceof ProgrammeInfeasibleError)) throw error;
    infeasible = error;
  }

  let exact = false;
  let limited = false;
  const small = columns <= (options.exactMaxColumns ?? EXACT_MAX_COLUMNS);
  if (solver && (small || columns <= (options.lpMaxColumns ?? LP_MAX_COLUMNS))) {
    const milp = buildMilp(problem);
    if (!small) {
      const lp = solver.solveLpRelaxation(milp.model, { timeLimitS });
      if (lp !== null && lp < bound) {
        bound = lp;
        boundMethod = 'lp_relaxation';
      }
    } else {
      const result = solver.solveMip(milp.model, { maxNodes: options.maxNodes ?? 5000, timeLimitS });
      if (result.status === 'infeasible')
        throw (
          infeasible ??
          new ProgrammeInfeasibleError(
            problem.items.filter((it) => it.mustPlace).map((it) => it.roomId),
            'the rooms forced in or pinned cannot all fit within the budgets and windows',
          )
        );
      if (result.colValues) {
        const found = assignmentFromSolution(problem, milp, result.colValues);
        const check = evaluatePlan(problem, found);
        if (check.violations.length === 0 && check.objective > objective) {
          assignment = found;
          objective = check.objective;
        }
      }
      if (result.dualBound !== null && result.dualBound < bound) {
        bound = result.dualBound;
        boundMethod = 'solver_dual_bound';
      }
      exact = result.status === 'optimal';
      limited = result.status !== 'optimal';
    }
  }
  if (!assignment) throw infeasible!;
  bound = Math.max(bound, objective);
  const gap = gapPct(objective, bound);
  const words = exact
    ? `Best possible plan: solved exactly by the HiGHS mixed-integer solver (${count(columns)} room-window choices).`
    : `Planned by the benefit-per-pound heuristic with school grouping${limited ? ' and improved by the HiGHS solver within its work limit' : ''} ` +
      `(${count(columns)} room-window choices); proven within ${pct(gap)} of the best possible plan (bound: ${BOUND_WORDS[boundMethod]}).`;
  return {
    assignment,
    info: {
      method: exact ? 'exact' : limited ? 'exact_limited' : 'heuristic',
      objective,
      bound,
      gapPct: gap,
      boundMethod,
      words,
      seconds: (now() - started) / 1000,
      columns,
    },
  };
}
