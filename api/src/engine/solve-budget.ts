/**
 * The run's time limit shared out over the windows still to solve, and its progress. Windows
 * of parallel segments run `threads` at a time, so each may use that many fair shares.
 */
export class SolveBudget {
  private readonly deadline: number;
  private total: number;
  private done = 0;

  constructor(
    timeLimitSeconds: number,
    windows: number,
    private readonly threads: number,
    private readonly onProgress?: (p: { windowsDone: number; windowsTotal: number }) => void,
  ) {
    this.deadline = performance.now() / 1000 + timeLimitSeconds;
    this.total = windows;
  }

  /**
   * The next window may use up to three times its fair share of what is left, so one hard
   * window can take longer without starving the rest; never less than 0.2 s.
   */
  nextLimitSeconds(): number {
    const remaining = this.deadline - performance.now() / 1000;
    const left = Math.max(1, this.total - this.done);
    return Math.max(0.2, Math.min(remaining, (3 * remaining * Math.min(this.threads, left)) / left));
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
