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

  it('gives a part of the work the seconds asked for, at most all that is left, at least the floor', () => {
    const d = Deadline.after(10, 0);
    expect(d.within(5, 0, 0).remainingSeconds(0)).toBe(5);
    expect(d.within(30, 0, 0).remainingSeconds(0)).toBe(10);
    expect(d.within(3, 0, 4_000).remainingSeconds(4_000)).toBe(3);
    expect(d.within(-1, 0, 0).remainingSeconds(0)).toBe(0);
    // 0.1 s left: the floor gives a late part 0.2 s, past the deadline itself.
    expect(d.within(10, 0.2, 9_900).remainingSeconds(9_900)).toBeCloseTo(0.2, 12);
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
  it('gives each window its fair share and what the windows before it saved, at most three fair shares', () => {
    const deadline = Deadline.after(100, 0);
    const budget = (windows: number, lanes = 1, onProgress?: (p: { windowsDone: number; windowsTotal: number }) => void) =>
      new SolveBudget(deadline, windows, lanes, onProgress, 0);
    // 10 windows on pace, one at a time: 10 s each; two at a time: 20 s each.
    expect(budget(10).nextWindowDeadline(0).remainingSeconds(0)).toBe(10);
    expect(budget(10, 2).nextWindowDeadline(0).remainingSeconds(0)).toBe(20);

    // The first window took 2 s of its 10: the second may use its 10 and the 8 saved.
    const saved = budget(10);
    saved.windowDone();
    expect(saved.nextWindowDeadline(2_000).remainingSeconds(2_000)).toBeCloseTo(18, 9);
    // Half of 100 windows done in 1 s: 50 s ahead of pace, but at most 3 × 99/50 s.
    const quick = budget(100);
    for (let i = 0; i < 50; i++) quick.windowDone();
    expect(quick.nextWindowDeadline(1_000).remainingSeconds(1_000)).toBeCloseTo((3 * 99) / 50, 9);
    // Behind pace (one window took 30 s): the fair share of what is left, 70 s over 9.
    const behind = budget(10);
    behind.windowDone();
    expect(behind.nextWindowDeadline(30_000).remainingSeconds(30_000)).toBeCloseTo(70 / 9, 9);

    const progress: [number, number][] = [];
    const replanned = budget(10, 1, (p) => progress.push([p.windowsDone, p.windowsTotal]));
    replanned.windowDone();
    replanned.windowDone();
    // A fallback replaces the rest with 4 windows at 20 s: a new pace of 80 s over 4.
    replanned.replan(4, 20_000);
    expect(replanned.nextWindowDeadline(20_000).remainingSeconds(20_000)).toBe(20);
    replanned.windowDone();
    expect(progress).toEqual([[1, 10], [2, 10], [3, 6]]);
    // The last window may use all that is left, and a window after the deadline still gets 0.2 s.
    expect(budget(1).nextWindowDeadline(90_000).remainingSeconds(90_000)).toBe(10);
    expect(budget(1).nextWindowDeadline(150_000).remainingSeconds(150_000)).toBeCloseTo(0.2, 12);
  });

  it('lets a window without a schedule go on, leaving half a fair share to each window after it', () => {
    const deadline = Deadline.after(100, 0);
    // 10 windows, one at a time: 9 after this one keep 9 × 5 s of the 100 s.
    expect(new SolveBudget(deadline, 10, 1, undefined, 0).lastResortDeadline(0).remainingSeconds(0)).toBeCloseTo(55, 9);
    // Two at a time: the 8 after these two keep 8 × 5 s.
    expect(new SolveBudget(deadline, 10, 2, undefined, 0).lastResortDeadline(0).remainingSeconds(0)).toBeCloseTo(60, 9);
    // The last window may use all that is left: the same as its share.
    expect(new SolveBudget(deadline, 1, 1, undefined, 0).lastResortDeadline(90_000).remainingSeconds(90_000)).toBeCloseTo(10, 9);
    // Never before the window's own share.
    for (const windows of [1, 2, 5, 14, 365]) {
      for (const lanes of [1, 2]) {
        const budget = new SolveBudget(deadline, windows, lanes, undefined, 0);
        expect(budget.lastResortDeadline(0).remainingSeconds(0)).toBeGreaterThanOrEqual(budget.nextWindowDeadline(0).remainingSeconds(0) - 1e-9);
      }
    }
  });
});
