import type { ModelArrays } from '../engine/model-arrays';
import type { SolveReply } from '../engine/solver-port';

/** What a HiGHS worker thread starts with. */
export interface HighsWorkerData {
  /** HiGHS's WebAssembly, compiled once by the pool (a WebAssembly.Module). */
  wasmModule: object;
  /** One Int32: the pool sets it to 1 to stop the solve in progress, and back to 0 before the next. */
  interruptFlag: SharedArrayBuffer;
}

/** Messages between the HiGHS pool (main thread) and a HiGHS worker thread. */
export interface HighsSolveMessage {
  type: 'solve';
  id: number;
  model: ModelArrays;
  /** HiGHS's own (soft) `time_limit`, counted from when the thread takes the model. */
  timeLimitSeconds: number;
  /** From when the thread takes the model: past this, a MIP that holds an incumbent stops with it. */
  stopWithSolutionAfterSeconds: number | null;
  mipGap: number;
  mipAbsGap?: number;
  /** SolveRequest.mipStart, or null. */
  mipStart: Float64Array | null;
  wantIis: boolean;
  wantDuals: boolean;
  /** Forward HiGHS's log lines; off, HiGHS formats and posts none. */
  wantLog: boolean;
}

/** A finished solve: the port's reply without what only the pool knows (its clock and its kill timer). */
export type HighsResult = Omit<SolveReply, 'killedAtDeadline' | 'workerSeconds'>;

export type HighsWorkerMessage =
  | { type: 'ready'; version: string }
  | { type: 'log'; id: number; line: string }
  | { type: 'incumbent'; id: number; colValue: Float64Array; objective: number }
  | ({ type: 'result'; id: number } & HighsResult)
  | { type: 'error'; id: number; message: string };
