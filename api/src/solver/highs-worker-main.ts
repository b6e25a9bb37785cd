import { parentPort, workerData } from 'node:worker_threads';
import highsImport from 'highs';
import type { SolveStatus } from '../engine/solver-port';
import { instantiateCompiled } from './compile-highs';
import { highsOptions } from './highs-options';
import type { HighsResult, HighsSolveMessage, HighsWorkerData, HighsWorkerMessage } from './highs-protocol';

const loadHighs = ((highsImport as any).default ?? highsImport) as typeof highsImport;
const { wasmModule, interruptFlag } = workerData as HighsWorkerData;
// The pool compiles HiGHS once and hands every thread the module.
const highs = await loadHighs(instantiateCompiled(wasmModule) as Parameters<typeof loadHighs>[0]);
const port = parentPort!;
const post = (message: HighsWorkerMessage, transfer: ArrayBuffer[] = []) => port.postMessage(message, transfer);
/** Set to 1 by the pool to stop the solve in progress (a cancel, or a race another solver won). */
const interrupt = new Int32Array(interruptFlag);

/** HiGHS's `primal_solution_status` / `dual_solution_status` for a feasible point. */
const FEASIBLE_POINT = 2;

// HiGHS model status codes (highs.constants.modelStatus).
const statusOf = (code: number): SolveStatus => {
  // An empty model (nothing to decide) is solved by its bounds alone.
  if (code === highs.constants.modelStatus.optimal || code === highs.constants.modelStatus.empty) return 'optimal';
  if (code === highs.constants.modelStatus.infeasible) return 'infeasible';
  if (code === highs.constants.modelStatus.unbounded || code === highs.constants.modelStatus.unboundedOrInfeasible) return 'unbounded';
  if (code === highs.constants.modelStatus.timeLimit || code === highs.constants.modelStatus.interrupted) return 'time-limit';
  return 'error';
};

function infoNumber(model: { info: { get(name: string): number | bigint } }, name: string): number | null {
  try {
    const v = Number(model.info.get(name));
    return Number.isFinite(v) ? v : null;
  } catch {
    return null;
  }
}

/** When the solve in progress may stop as soon as it holds an incumbent (performance.now() ms), and whether it holds one. */
let stopWithSolutionAtMs = Infinity;
let holdsIncumbent = false;

function stopWhenInterrupted(event: { interrupt(): void }): undefined {
  if (Atomics.load(interrupt, 0) !== 0 || (holdsIncumbent && performance.now() >= stopWithSolutionAtMs)) event.interrupt();
  return undefined;
}

function solve(req: HighsSolveMessage): HighsResult {
  const m = req.model;
  const isMip = m.integrality.some((v) => v !== 0);
  const model = highs.createModel({
    numCols: m.numCols,
    numRows: m.numRows,
    sense: highs.constants.objectiveSense.maximize,
    colCost: m.colCost,
    colLower: m.colLower,
    colUpper: m.colUpper,
    rowLower: m.rowLower,
    rowUpper: m.rowUpper,
    matrix: { format: 'csc', numRows: m.numRows, numCols: m.numCols, starts: m.starts, indices: m.indices, values: m.values },
    integrality: m.integrality,
  });
  holdsIncumbent = false;
  stopWithSolutionAtMs = req.stopWithSolutionAfterSeconds === null ? Infinity : performance.now() + req.stopWithSolutionAfterSeconds * 1000;
  try {
    model.options.set(highsOptions(isMip, req));
    if (isMip && req.mipStart) offerStart(model, m, req.mipStart);
    const run = model.run({
      0: (event) => {
        post({ type: 'log', id: req.id, line: event.message.replace(/\n$/, '') });
        return undefined;
      },
      1: stopWhenInterrupted,
      4: (event) => {
        const x = event.data.mip_solution;
        if (x) {
          holdsIncumbent = true;
          post({ type: 'incumbent', id: req.id, colValue: x, objective: event.data.objective_function_value ?? NaN }, [x.buffer as ArrayBuffer]);
        }
        return undefined;
      },
      6: stopWhenInterrupted,
    });
    const status = statusOf(run.modelStatus);
    const empty = run.modelStatus === highs.constants.modelStatus.empty;
    const hasPrimal = empty || infoNumber(model, 'primal_solution_status') === FEASIBLE_POINT;
    const solution = hasPrimal && (status === 'optimal' || status === 'time-limit') && m.numCols > 0 ? model.getSolution() : null;
    const colValue = hasPrimal && (status === 'optimal' || status === 'time-limit') ? (solution?.colValue ?? new Float64Array(0)) : null;
    const hasDuals = req.wantDuals && !isMip && status === 'optimal' && (empty || infoNumber(model, 'dual_solution_status') === FEASIBLE_POINT);
    const rowDual = hasDuals ? (solution?.rowDual ?? new Float64Array(m.numRows)) : null;
    let iis: HighsResult['iis'] = null;
    if (status === 'infeasible' && req.wantIis) {
      try {
        // The light default strategy finds nothing once presolve has proved infeasibility; an
        // elastic LP refined to an irreducible set (of the LP relaxation, for a MIP) does.
        model.options.set({ iis_strategy: (isMip ? 16 : 0) + highs.constants.iis.strategyRowPriority } as any);
        const r = model.getIis();
        iis = { rows: r.rowIndex, cols: r.colIndex };
      } catch {
        iis = null;
      }
    }
    return {
      status,
      solverStatus: `HiGHS model status ${run.modelStatus}`,
      colValue,
      objective: colValue ? model.getObjectiveValue() : null,
      dualBound: isMip ? infoNumber(model, 'mip_dual_bound') : colValue && status === 'optimal' ? model.getObjectiveValue() : null,
      mipGap: isMip ? infoNumber(model, 'mip_gap') : colValue && status === 'optimal' ? 0 : null,
      rowDual,
      iis,
    };
  } finally {
    model.dispose();
  }
}

/**
 * The columns of a MIP start that have a value, as HiGHS's sparse start; HiGHS checks it against
 * the rows and completes the rest. A start outside a column's bounds is not offered (HiGHS refuses
 * it with an error), and one HiGHS refuses is dropped: a start is a guess, never a reason to fail.
 */
function offerStart(model: { setSolution(start: { indices: Int32Array; values: Float64Array }): unknown }, m: HighsSolveMessage['model'], start: Float64Array): void {
  const indices: number[] = [];
  for (let j = 0; j < start.length; j++) {
    const v = start[j];
    if (Number.isNaN(v)) continue;
    if (v < m.colLower[j] || v > m.colUpper[j]) return;
    indices.push(j);
  }
  if (!indices.length) return;
  try {
    model.setSolution({ indices: Int32Array.from(indices), values: Float64Array.from(indices, (j) => start[j]) });
  } catch {
    // Refused: the solve goes on without it.
  }
}

port.on('message', (req: HighsSolveMessage) => {
  try {
    const result = solve(req);
    const transfer = [result.colValue, result.rowDual].flatMap((a) => (a ? [a.buffer as ArrayBuffer] : []));
    post({ type: 'result', id: req.id, ...result }, transfer);
  } catch (err) {
    post({ type: 'error', id: req.id, message: err instanceof Error ? err.message : String(err) });
  }
});

post({ type: 'ready', version: highs.version.string });
