import os from 'node:os';

/** Solver threads when nobody says: one per core, at most four (each holds its own HiGHS heap). */
export function defaultSolverThreads(): number {
  return Math.max(1, Math.min(4, os.availableParallelism()));
}
