import { blockModel, findIndependentBlocks, type ModelBlock } from './independent-blocks';
import type { ModelArrays } from './model-arrays';
import { GAP_ZERO_GUARD, TINY } from './numerics';
import { SolveAbortedError, type SolveReply, type SolveRequest, type SolverPort } from './solver-port';

export interface BlocksResult extends SolveReply {
  /** Independent parts the model was solved in (1: solved whole). */
  blocks: number;
}

/**
 * The relative gap as solvers commonly define it, |bound − value| / |value|, with a tiny
 * constant in the denominator so a zero value gives a large finite number rather than a division by zero.
 */
export function relativeGap(value: number, bound: number): number {
  if (value === bound) return 0;
  return Math.abs(bound - value) / (GAP_ZERO_GUARD + Math.abs(value));
}

/** A block's outcome that leaves the whole model without a solution: the others need not go on. */
const hopeless = (r: SolveReply) => r.status === 'infeasible' || r.status === 'unbounded' || r.status === 'error' || !r.colValue;

/**
 * Solves a model, split into its independent blocks when `split` is set (independent-blocks.ts),
 * the blocks in parallel on the solver. Their solutions are put together into one column vector;
 * objective and bound are sums. When blocks of opposite sign make the summed gap exceed the
 * requested gap although every block met it, the blocks holding the slack are solved again to
 * an absolute gap that brings the sum within it. A block that cannot be solved stops the others.
 */
export async function solveInBlocks(solver: SolverPort, model: ModelArrays, request: SolveRequest, split: boolean): Promise<BlocksResult> {
  const blocks = split ? findIndependentBlocks(model) : [];
  if (blocks.length <= 1) return { ...(await solver.solve(model, request)), blocks: 1 };

  const stop = new AbortController();
  const abortAll = () => stop.abort();
  request.signal?.addEventListener('abort', abortAll, { once: true });
  const parts = blocks.map((b) => blockModel(model, b));
  const solvePart = async (k: number, extra: Partial<SolveRequest> = {}): Promise<SolveReply> => {
    const r = await solver.solve(parts[k], {
      ...request,
      mipStart: request.mipStart && Float64Array.from(blocks[k].cols, (j) => request.mipStart![j]),
      ...extra,
      signal: stop.signal,
      onLog: request.onLog && ((line) => request.onLog!(`[block ${k + 1}/${parts.length}] ${line}`)),
    });
    if (hopeless(r)) stop.abort();
    return r;
  };
  try {
    const results = await settle(parts.map((_, k) => solvePart(k)), request.signal);
    const failed = firstFailure(results);
    if (failed >= 0) return combineFailure(blocks, results, failed);

    const first = combine(model, blocks, results as SolveReply[]);
    if (first.status !== 'optimal' || first.mipGap === null || first.mipGap <= request.mipGap) return first;
    const allowance = Math.max((request.mipGap * Math.abs(first.objective!)) / parts.length, TINY);
    const again = await settle(
      (results as SolveReply[]).map((r, k) =>
        r.dualBound !== null && Math.abs(r.dualBound - r.objective!) > allowance ? solvePart(k, { mipGap: 0, mipAbsGap: allowance }) : Promise.resolve(r),
      ),
      request.signal,
    );
    const failedAgain = firstFailure(again);
    return failedAgain >= 0 ? combineFailure(blocks, again, failedAgain) : combine(model, blocks, again as SolveReply[]);
  } finally {
    request.signal?.removeEventListener('abort', abortAll);
  }
}

/**
 * Waits for every block, in block order; null for a block stopped because another failed. An
 * abort by the caller wins, and a block's own error is rethrown.
 */
async function settle(promises: Promise<SolveReply>[], signal: AbortSignal | undefined): Promise<(SolveReply | null)[]> {
  const settled = await Promise.allSettled(promises);
  if (signal?.aborted) throw new SolveAbortedError();
  return settled.map((s) => {
    if (s.status === 'fulfilled') return s.value;
    if (s.reason instanceof SolveAbortedError) return null;
    throw s.reason;
  });
}

/** The block whose failure decides, or −1; a block stopped early (null) means another failed. */
function firstFailure(results: (SolveReply | null)[]): number {
  const k = results.findIndex((r) => r !== null && hopeless(r));
  if (k < 0 && results.includes(null)) throw new SolveAbortedError();
  return k;
}

function combineFailure(blocks: ModelBlock[], results: (SolveReply | null)[], k: number): BlocksResult {
  const failed = results[k]!;
  const iis = failed.iis && {
    rows: Int32Array.from(failed.iis.rows, (i) => blocks[k].rows[i]),
    cols: Int32Array.from(failed.iis.cols, (j) => blocks[k].cols[j]),
  };
  return {
    ...failed,
    colValue: null,
    objective: null,
    dualBound: null,
    mipGap: null,
    rowDual: null,
    iis,
    killedAtDeadline: results.some((r) => r?.killedAtDeadline === true),
    workerSeconds: results.reduce((sum, r) => sum + (r?.workerSeconds ?? 0), 0),
    blocks: blocks.length,
  };
}

function combine(model: ModelArrays, blocks: ModelBlock[], results: SolveReply[]): BlocksResult {
  const colValue = new Float64Array(model.numCols);
  let objective = 0;
  let dualBound: number | null = 0;
  let workerSeconds = 0;
  results.forEach((r, k) => {
    blocks[k].cols.forEach((j, c) => (colValue[j] = r.colValue![c]));
    objective += r.objective!;
    dualBound = dualBound === null || r.dualBound === null ? null : dualBound + r.dualBound;
    workerSeconds += r.workerSeconds;
  });
  const optimal = results.every((r) => r.status === 'optimal');
  return {
    status: optimal ? 'optimal' : 'time-limit',
    solverStatus: (results.find((r) => r.status !== 'optimal') ?? results[0]).solverStatus,
    colValue,
    objective,
    dualBound,
    mipGap: dualBound === null ? null : relativeGap(objective, dualBound),
    // Only a MIP splits (independent-blocks.ts gathers every part without binaries into one
    // block), and a MIP has no duals: an LP's come back whole, from the single solve above.
    rowDual: null,
    iis: null,
    killedAtDeadline: results.some((r) => r.killedAtDeadline),
    workerSeconds,
    blocks: blocks.length,
  };
}
