import type { Deadline } from './deadline';

/** A window started with less time than this still gets it: too little to solve is a failure, a little late is not. */
const MIN_WINDOW_SECONDS = 0.2;

/**
 * The run's deadline shared out over the windows still to solve, and its progress. Windows
 * of parallel segments run `concurrency` at a time, so each may use that many fair shares.
 *
 * Each window is paced against the plan made when the windows were counted: it may use its fair
 * share, and what the windows before it saved, up to three fair shares of what is left. Giving
 * every window three shares outright starved the end of a run whose windows were all hard: on a
 * fortnight of 15-minute island windows with a 60 s limit each took its full share, the shares
 * shrank with the time left, and the tenth window got 1 s and found nothing, failing the run.
 */
export class SolveBudget {
  private total: number;
  private done = 0;
  /** Seconds of the deadline per window when the windows were last counted. */
  private paceSeconds: number;

  constructor(
    private readonly deadline: Deadline,
    windows: number,
    private readonly concurrency: number,
    private readonly onProgress?: (p: { windowsDone: number; windowsTotal: number }) => void,
    nowMs?: number,
  ) {
    this.total = windows;
    this.paceSeconds = deadline.remainingSeconds(nowMs) / Math.max(1, windows);
  }

  /** When the next window should end: its fair share and the time saved before it, at most three fair shares. */
  nextWindowDeadline(nowMs?: number): Deadline {
    const left = this.left();
    const lanes = Math.min(this.concurrency, left);
    const remaining = this.deadline.remainingSeconds(nowMs);
    const fair = (lanes * remaining) / left;
    const ahead = remaining - (left - lanes) * this.paceSeconds;
    return this.after(Math.min(3 * fair, Math.max(fair, ahead)), nowMs);
  }

  /**
   * How long the next window may go on when it has no feasible schedule by its deadline: a window
   * without one fails the whole run, so it may take what is left but half a fair share for each
   * window after it.
   */
  lastResortDeadline(nowMs?: number): Deadline {
    const left = this.left();
    const others = left - Math.min(this.concurrency, left);
    const soft = this.nextWindowDeadline(nowMs).remainingSeconds(nowMs);
    return this.after(Math.max(soft, this.deadline.remainingSeconds(nowMs) * (1 - others / (2 * left))), nowMs);
  }

  /** From now on exactly this many windows remain (a fallback replaces the planned rest). */
  replan(windowsLeft: number, nowMs?: number): void {
    this.total = this.done + windowsLeft;
    this.paceSeconds = this.deadline.remainingSeconds(nowMs) / Math.max(1, windowsLeft);
  }

  windowDone(): void {
    this.done++;
    this.onProgress?.({ windowsDone: this.done, windowsTotal: this.total });
  }

  private after(seconds: number, nowMs?: number): Deadline {
    return this.deadline.within(seconds, MIN_WINDOW_SECONDS, nowMs);
  }

  private left(): number {
    return Math.max(1, this.total - this.done);
  }
}
