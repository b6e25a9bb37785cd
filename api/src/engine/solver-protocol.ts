import type { ModelArrays } from './model-arrays';

/** Messages between the solver pool (main thread) and a HiGHS worker thread. */
export interface SolveRequest {
  type: 'solve';
  id: number;
  model: ModelArrays;
  timeLimitSeconds: number;
  mipGap: number;
  /** Absolute gap in the model's objective units; absent ⇒ HiGHS's default. */
  mipAbsGap?: number;
  /** Compute an infeasible subsystem when the model is proved infeasible. */
  wantIis: boolean;
  /** Forward HiGHS's log lines; off, HiGHS formats and posts none. */
  wantLog: boolean;
  /** Return the row duals of an LP (∂objective/∂row bound, maximising). */
  wantDuals: boolean;
}

export type SolveStatus = 'optimal' | 'infeasible' | 'time-limit' | 'unbounded' | 'error';

export interface SolveReply {
  type: 'result';
  id: number;
  status: SolveStatus;
  /** HiGHS model status code, for the log. */
  modelStatus: number;
  /** Present when a feasible point exists (optimal, or a time limit with an incumbent). */
  colValue: Float64Array | null;
  objective: number | null;
  dualBound: number | null;
  mipGap: number | null;
  nodes: number;
  runSeconds: number;
  iis: { rows: Int32Array; cols: Int32Array } | null;
  /** Row duals of an LP solved to optimality when asked for; else null. */
  rowDual: Float64Array | null;
}

export type WorkerMessage =
  | { type: 'ready'; version: string }
  | { type: 'log'; id: number; line: string }
  | { type: 'incumbent'; id: number; colValue: Float64Array; objective: number }
  | SolveReply
  | { type: 'error'; id: number; message: string };
