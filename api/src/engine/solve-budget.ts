import type { Deadline } from './deadline';

/** A window started with less time than this still gets it: too little to solve is a failure, a little late is not. */
const MIN_WINDOW_SECONDS = 0.2;

/**
 * The run's deadline shared out over the windows still to solve, and its progress. Windows
 * of parallel segments run `concurrency` at a time, so each may use that many fair shares.
 */
export class SolveBudget {
  private total: number;
  private done = 0;

  constructor(
    private readonly deadline: Deadline,
    windows: number,
    private readonly concurrency: number,
    private readonly onProgress?: (p: { windowsDone: number; windowsTotal: number }) => void,
  ) {
    this.total = windows;
  }

  /**
   * The next window may use up to three times its fair share of what is left, so one hard
   * window can take longer without starving the rest.
   */
  nextWindowDeadline(nowMs?: number): Deadline {
    const left = Math.max(1, this.total - this.done);
    return this.deadline.share((3 * Math.min(this.concurrency, left)) / left, MIN_WINDOW_SECONDS, nowMs);
  }

  /** From now on exactly this many windows remain (a fallback replaces the planned rest). */
  replan(windowsLeft: number): void {
    this.total = this.done + windowsLeft;
  }

  windowDone(): void {
    this.done++;
    this.onProgress?.({ windowsDone: this.done, windowsTotal: this.total });
  }
}
