import type { Deadline } from './deadline';
import type { ModelArrays } from './model-arrays';

/**
 * What the engine needs from a MILP solver. The engine builds models and reads answers; an
 * adapter (api/src/solver/ for HiGHS) owns processes, threads and files. The engine calls
 * `solve` concurrently — independent blocks and parallel rolling segments — and the adapter
 * queues whatever exceeds its `concurrency`.
 */
export interface SolverPort {
  /** How many solves run at once; the engine plans its parallel work for this many. */
  readonly concurrency: number;
  /** Name and version, for the result's report. */
  describe(): Promise<SolverIdentity>;
  /**
   * Solves a maximisation. Resolves for every outcome of the model (infeasible and out of time
   * included); rejects with SolveAbortedError when `request.signal` aborts, and with another
   * error when the solver itself fails.
   */
  solve(model: ModelArrays, request: SolveRequest): Promise<SolveReply>;
}

export interface SolverIdentity {
  name: string;
  version: string;
}

export interface SolveRequest {
  /** The solve ends by this instant; time spent waiting for a free solver counts. */
  deadline: Deadline;
  /**
   * Once it holds a feasible point, the solve stops at this instant (before `deadline`); without
   * one it goes on until `deadline`. Absent: it stops at `deadline` only.
   */
  stopWithSolutionBy?: Deadline;
  /** Relative MIP gap at which the solver may stop. */
  mipGap: number;
  /**
   * A guess at a MIP's solution, one value per column, NaN where there is none: the solver tries
   * it (completing the columns left open) and keeps it as its first incumbent if it is feasible.
   */
  mipStart?: Float64Array;
  /** Absolute gap in the model's objective units; absent ⇒ the solver's default. */
  mipAbsGap?: number;
  /** Find an irreducible infeasible subsystem when the model is proved infeasible. */
  wantIis?: boolean;
  /** Return the row duals of an LP solved to optimality (a MIP has none: fix its integers first). */
  wantDuals?: boolean;
  signal?: AbortSignal;
  /** The solver's log lines; without it the solver formats none. */
  onLog?: (line: string) => void;
}

export type SolveStatus = 'optimal' | 'infeasible' | 'time-limit' | 'unbounded' | 'error';

export interface SolveReply {
  status: SolveStatus;
  /** The solver's own word for how it ended, for messages and the log (e.g. "HiGHS model status 7"). */
  solverStatus: string;
  /** Present when a feasible point exists (optimal, or out of time with an incumbent). */
  colValue: Float64Array | null;
  objective: number | null;
  dualBound: number | null;
  mipGap: number | null;
  /**
   * With `wantDuals`, for an LP solved to optimality: per row, the change of the optimal
   * objective per unit raise of the row's active bound (a balance row's dual is the marginal
   * value of energy at that step). Null otherwise.
   */
  rowDual: Float64Array | null;
  /** With `wantIis`, for an infeasible model: the rows and columns of a conflict. */
  iis: { rows: Int32Array; cols: Int32Array } | null;
  /** The solver overran its deadline and was stopped; `colValue` holds its last incumbent, if any. */
  killedAtDeadline: boolean;
  /** From when a solver took the model to its answer: time spent queued for a free solver is not counted. */
  workerSeconds: number;
}

/** The caller's signal aborted the solve. */
export class SolveAbortedError extends Error {
  constructor() {
    super('The solve was cancelled');
    this.name = 'SolveAbortedError';
  }
}
