import type { RunStatus } from '@gridwright/shared/run-result';

interface Move {
  from: readonly RunStatus[];
  to: RunStatus | readonly RunStatus[];
}

/**
 * Every move the `runs` row may make, by the name of the transition in `transitions.ts` that makes
 * it. The transitions read their preconditions and targets from here, so a state the list in
 * `shared/src/run-result.ts` does not name cannot appear in their SQL.
 */
export const RUN_TRANSITIONS = {
  claim: { from: ['queued'], to: 'running' },
  requeue: { from: ['running'], to: 'queued' },
  recordProgress: { from: ['running'], to: 'running' },
  requestCancel: { from: ['running'], to: 'running' },
  finish: { from: ['running'], to: ['succeeded', 'failed'] },
  fail: { from: ['running'], to: 'failed' },
  cancelRunning: { from: ['running'], to: 'cancelled' },
  cancelQueued: { from: ['queued'], to: 'cancelled' },
  deadLetter: { from: ['queued', 'running'], to: 'failed' },
} as const satisfies Record<string, Move>;

export type TransitionName = keyof typeof RUN_TRANSITIONS;

/** A state no transition leaves: the run has its final row and its webhook event. */
export type FinishedStatus = Exclude<RunStatus, (typeof RUN_TRANSITIONS)[TransitionName]['from'][number]>;

/** The states a transition applies to, as the `text[]` its SQL compares `status` with. */
export const fromStates = (name: TransitionName): RunStatus[] => [...RUN_TRANSITIONS[name].from];
