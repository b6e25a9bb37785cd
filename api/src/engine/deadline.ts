/**
 * A run's time limit, from submission to HiGHS, and every clock derived from it: this file is
 * the one place they are defined.
 *
 *   submission   The run stores its `timeLimitSeconds` (the spec's, or the default for its size).
 *   queue        Its pg-boss job expires `queueExpirySeconds` after a worker takes it: the limit
 *                plus RUN_EXPIRY_GRACE_SECONDS. Only a dead worker's job gets that far; pg-boss
 *                then retries it, as after a crash.
 *   worker       Claiming the run starts its Deadline: `Deadline.after(limit)`. The worker's hard
 *                stop (`workerHardStop`) aborts the solve half the grace after it, so a live
 *                worker always ends its run before the job expires.
 *   engine       `SolveBudget` shares the run's deadline out over the windows still to solve
 *                (`deadline.within`); each window, its blocks and its re-solves end by that share.
 *   solver port  Each solve carries its window's deadline. The HiGHS pool sets HiGHS's own
 *                `time_limit` to what remains when a thread takes the solve (at least
 *                MIN_SOLVE_SECONDS), and terminates the thread `solverOverrunSeconds` after that,
 *                because HiGHS's `time_limit` is soft (a 5 s limit measured returning after 14 s).
 *
 * Instants are on the monotonic clock of the process (`performance.now()`, milliseconds), which
 * no change of the wall clock moves; a deadline never leaves the process that started it.
 */

const monotonicMs = () => performance.now();

/** The least a solver is given, however little time is left: below this HiGHS rarely finds even a first schedule. */
export const MIN_SOLVE_SECONDS = 0.05;

/** An instant by which a piece of work must end. Immutable; every derived deadline is a new value. */
export class Deadline {
  private constructor(private readonly atMs: number) {}

  /** `seconds` from now. */
  static after(seconds: number, nowMs = monotonicMs()): Deadline {
    return new Deadline(nowMs + seconds * 1000);
  }

  /** Seconds left, never negative. */
  remainingSeconds(nowMs = monotonicMs()): number {
    return Math.max(0, (this.atMs - nowMs) / 1000);
  }

  /**
   * A deadline for a part of the work: `seconds` from now but not after this one, yet at least
   * `floorSeconds` from now — a part started late still gets a chance to finish.
   */
  within(seconds: number, floorSeconds = 0, nowMs = monotonicMs()): Deadline {
    return Deadline.after(Math.max(floorSeconds, Math.min(Math.max(0, seconds), this.remainingSeconds(nowMs))), nowMs);
  }

  /** The same instant `seconds` later: a hard stop behind a soft limit. */
  extendedBy(seconds: number): Deadline {
    return new Deadline(this.atMs + seconds * 1000);
  }
}

/** The queue job's expiry, counted by pg-boss from when a worker takes the job. */
export function queueExpirySeconds(timeLimitSeconds: number, graceSeconds: number): number {
  return Math.ceil(timeLimitSeconds + graceSeconds);
}

/** When the worker stops a run the engine has not ended: half the grace after its deadline, well before the job expires. */
export function workerHardStop(deadline: Deadline, graceSeconds: number): Deadline {
  return deadline.extendedBy(graceSeconds / 2);
}

/** How long a solver whose own time limit is soft may overrun `limitSeconds` before it is terminated. */
export function solverOverrunSeconds(limitSeconds: number): number {
  return Math.max(2, 0.25 * limitSeconds);
}
