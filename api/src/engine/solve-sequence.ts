import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { advanceState } from './carry-state';
import type { HorizonWindow, SiteFacts, WindowEndState, WindowStartState } from './plan-window';
import type { ScheduleBuffers } from './schedule-buffers';
import type { SolveBudget } from './solve-budget';
import { solveWindow, type WindowSolve } from './solve-window';
import { SolveAbortedError, type SolverPort } from './solver-port';

export interface SolveContext {
  spec: ResolvedSiteSpec;
  /** Planning figures of the whole spec, computed once per solve. */
  facts: SiteFacts;
  buffers: ScheduleBuffers;
  solver: SolverPort;
  budget: SolveBudget;
  signal?: AbortSignal;
  onLog?: (line: string) => void;
}

export interface WindowRecord {
  kind: 'window' | 'seam-probe';
  window: HorizonWindow;
  result: WindowSolve;
}

export interface SequenceEnd {
  /** Every window solved, in order; the last one failed when `failedAt` is set. */
  records: WindowRecord[];
  /** The state before each solved window. */
  statesBefore: WindowStartState[];
  /** The state after the last committed step. */
  state: WindowStartState;
  /** Index of the window that came out infeasible or without a solution, if one did. */
  failedAt: number | null;
}

/** A window that came out infeasible or without a solution leaves nothing to go on from. */
export const endedWithoutSchedule = (result: WindowSolve) => result.outcome === 'infeasible' || result.outcome === 'no-solution';

/** The window a sequence ended on without a schedule, if it did. */
export const failedRecord = (end: SequenceEnd): WindowRecord | null => (end.failedAt === null ? null : end.records[end.failedAt]);

/**
 * One window on the run's solver threads, within its share of the run's time — or longer, up to
 * the budget's last resort, while it has no feasible schedule yet. With `guessFrom`, `buffers`
 * holds the schedule its sequence committed from that step up to the window, and the solver starts
 * from a guess made of it (WindowSolveOptions).
 */
export async function solveBudgetedWindow(
  ctx: SolveContext,
  window: HorizonWindow,
  start: WindowStartState,
  buffers: ScheduleBuffers,
  guessFrom?: number,
): Promise<WindowSolve> {
  const result = await solveWindow(ctx.spec, ctx.facts, window, start, buffers, {
    guessFrom,
    solver: ctx.solver,
    stopWithSolutionBy: ctx.budget.nextWindowDeadline(),
    deadline: ctx.budget.lastResortDeadline(),
    signal: ctx.signal,
    onLog: ctx.onLog,
  });
  ctx.budget.windowDone();
  return result;
}

/**
 * Solves windows one after the other, each from the state the previous one committed.
 * `endState`, when given, is awaited before the last window only and fixes how it ends (null:
 * it ends freely).
 */
export async function solveSequence(
  ctx: SolveContext,
  windows: HorizonWindow[],
  start: WindowStartState,
  endState?: () => Promise<WindowEndState | null>,
): Promise<SequenceEnd> {
  const records: WindowRecord[] = [];
  const statesBefore: WindowStartState[] = [];
  let state = start;
  // Windows that reach the gap within their share solve as fast without a guess, and a guess
  // costs them time (a rolling year of a grid-tied site: 25 % more solver time): only a window
  // after one that ran out of its share starts from one.
  let guess = false;
  for (let i = 0; i < windows.length; i++) {
    if (ctx.signal?.aborted) throw new SolveAbortedError();
    const end = i === windows.length - 1 && endState ? await endState() : null;
    const window = end ? { ...windows[i], endState: end } : windows[i];
    statesBefore.push(state);
    const result = await solveBudgetedWindow(ctx, window, state, ctx.buffers, guess ? windows[0].from : undefined);
    records.push({ kind: 'window', window, result });
    guess = result.outcome !== 'optimal';
    if (endedWithoutSchedule(result)) return { records, statesBefore, state, failedAt: i };
    state = advanceState(ctx.spec, ctx.facts.chargeSteps, state, ctx.buffers, window.from, window.from + window.commit);
  }
  return { records, statesBefore, state, failedAt: null };
}
