/**
 * The HiGHS mixed-integer solver (compiled to WebAssembly, the `highs` package) behind the engine's
 * MipSolver interface. Loaded once per process; every solve gets a fresh model, a fixed seed and a node
 * limit, so the same model always gives the same answer.
 */
import loadHighs from 'highs';
import type { MilpModel, MipResult, MipSolver } from '../../engine/programme/milp';

type Highs = Awaited<ReturnType<typeof loadHighs>>;
let loading: Promise<Highs> | null = null;

function createModel(highs: Highs, m: MilpModel, integer: boolean) {
  return highs.createModel({
    numCols: m.numCols,
    numRows: m.numRows,
    sense: highs.constants.objectiveSense.maximize,
    offset: 0,
    colCost: m.colCost,
    colLower: new Float64Array(m.numCols),
    colUpper: new Float64Array(m.numCols).fill(1),
    rowLower: m.rowLower.map((v) => (Number.isFinite(v) ? v : -highs.infinity)),
    rowUpper: m.rowUpper,
    matrix: {
      format: 'csc',
      numRows: m.numRows,
      numCols: m.numCols,
      starts: m.starts,
      indices: m.indices,
      values: m.values,
    },
    integrality: new Int32Array(m.numCols).fill(
      integer ? highs.constants.variableType.integer : highs.constants.variableType.continuous,
    ),
  });
}

function solveMip(highs: Highs, m: MilpModel, limits: { maxNodes: number; timeLimitS: number }): MipResult {
  const model = createModel(highs, m, true);
  try {
    model.options.set({
      output_flag: false,
      random_seed: 0,
      mip_rel_gap: 1e-4,
      mip_max_nodes: limits.maxNodes,
      time_limit: limits.timeLimitS,
    });
    model.run();
    const status = model.getModelStatus();
    const codes = highs.constants.modelStatus;
    if (status === codes.infeasible) return { status: 'infeasible', objective: null, dualBound: null, colValues: null };
    const hasSolution = Number(model.info.get('primal_solution_status')) === 2;
    const dual = Number(model.info.get('mip_dual_bound'));
    return {
      status: status === codes.optimal ? 'optimal' : hasSolution ? 'limit' : 'failed',
      objective: hasSolution ? model.getObjectiveValue() : null,
      dualBound: Number.isFinite(dual) ? dual : null,
      colValues: hasSolution ? Float64Array.from(model.getSolution().colValue) : null,
    };
  } finally {
    model.dispose();
  }
}

function solveLp(highs: Highs, m: MilpModel, limits: { timeLimitS: number }): number | null {
  const model = createModel(highs, m, false);
  try {
    model.options.set({ output_flag: false, random_seed: 0, solver: 'simplex', time_limit: limits.timeLimitS });
    model.run();
    return model.getModelStatus() === highs.constants.modelStatus.optimal ? model.getObjectiveValue() : null;
  } finally {
    model.dispose();
  }
}

/** The solver, once HiGHS has loaded (the first call loads the WebAssembly module). */
export async function getHighsSolver(): Promise<MipSolver> {
  loading ??= loadHighs();
  const highs = await loading;
  return {
    solveMip: (model, limits) => solveMip(highs, model, limits),
    solveLpRelaxation: (model, limits) => solveLp(highs, model, limits),
  };
}
