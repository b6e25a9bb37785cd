import { describe, expect, it } from 'vitest';
import { Deadline, queueExpirySeconds, solverOverrunSeconds, workerHardStop } from '../../api/src/engine/deadline';
import { SolveBudget } from '../../api/src/engine/solve-budget';

// Every instant is given explicitly (milliseconds on the monotonic clock), so nothing here waits.
describe('deadline', () => {
  it('counts down to zero and never below', () => {
    const d = Deadline.after(10, 1_000);
    expect(d.remainingSeconds(1_000)).toBe(10);
    expect(d.remainingSeconds(6_000)).toBe(5);
    expect(d.remainingSeconds(20_000)).toBe(0);
    expect(d.extendedBy(60).remainingSeconds(1_000)).toBe(70);
  });

  it('shares out a fraction of what is left, at most all of it, at least the floor', () => {
    const d = Deadline.after(10, 0);
    expect(d.share(0.5, 0, 0).remainingSeconds(0)).toBe(5);
    expect(d.share(3, 0, 0).remainingSeconds(0)).toBe(10);
    expect(d.share(0.5, 0, 4_000).remainingSeconds(4_000)).toBe(3);
    // 0.1 s left: the floor gives a late part 0.2 s, past the deadline itself.
    expect(d.share(1, 0.2, 9_900).remainingSeconds(9_900)).toBeCloseTo(0.2, 12);
  });

  it('derives the hard stops so a live worker always ends its run before the queue job expires', () => {
    // A 30 s limit with the default 120 s grace: the job expires at 150 s, the worker stops the run at 90 s.
    expect(queueExpirySeconds(30, 120)).toBe(150);
    expect(workerHardStop(Deadline.after(30, 0), 120).remainingSeconds(0)).toBe(90);
    expect(queueExpirySeconds(0.5, 120)).toBe(121);
    for (const [limit, grace] of [[0.5, 1], [30, 120], [3600, 120]]) {
      expect(workerHardStop(Deadline.after(limit, 0), grace).remainingSeconds(0)).toBeLessThan(queueExpirySeconds(limit, grace));
    }
    // HiGHS may overrun a short limit by 2 s and a long one by a quarter (PLATFORM.md: 5 s → 14 s seen).
    expect(solverOverrunSeconds(5)).toBe(2);
    expect(solverOverrunSeconds(40)).toBe(10);
  });
});

describe('solve budget', () => {
  it('gives each window up to three fair shares of what is left, per solver it may run on', () => {
    const deadline = Deadline.after(100, 0);
    // 10 windows, one at a time: 3/10 of 100 s.
    expect(new SolveBudget(deadline, 10, 1).nextWindowDeadline(0).remainingSeconds(0)).toBe(30);
    // Two parallel segments: twice the share.
    expect(new SolveBudget(deadline, 10, 2).nextWindowDeadline(0).remainingSeconds(0)).toBe(60);

    const progress: [number, number][] = [];
    const budget = new SolveBudget(deadline, 10, 1, (p) => progress.push([p.windowsDone, p.windowsTotal]));
    budget.windowDone();
    budget.windowDone();
    // A fallback replaces the rest with 4 windows: 3/4 of the 80 s left at 20 s.
    budget.replan(4);
    expect(budget.nextWindowDeadline(20_000).remainingSeconds(20_000)).toBe(60);
    budget.windowDone();
    expect(progress).toEqual([[1, 10], [2, 10], [3, 6]]);
    // The last window may use all that is left, and a window after the deadline still gets 0.2 s.
    expect(new SolveBudget(deadline, 1, 1).nextWindowDeadline(90_000).remainingSeconds(90_000)).toBe(10);
    expect(new SolveBudget(deadline, 1, 1).nextWindowDeadline(150_000).remainingSeconds(150_000)).toBeCloseTo(0.2, 12);
  });
});
