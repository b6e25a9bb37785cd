import { describe, expect, it } from 'vitest';
import { usagePoints } from './usage-series';

// Worked by hand: a 4-day period, quota 100 runs and 40 solver-seconds.
describe('usagePoints', () => {
  const days = [
    { date: '2026-12-01', runs: 10, solverSeconds: 1.5 },
    { date: '2026-12-02', runs: 0, solverSeconds: 0 },
    { date: '2026-12-03', runs: 30, solverSeconds: 8.25 },
    { date: '2026-12-04', runs: 5, solverSeconds: 0.1 },
  ];
  const points = usagePoints(days, { runs: 100, solverSeconds: 40 });

  it('keeps running totals', () => {
    expect(points.map((p) => p.runsToDate)).toEqual([10, 10, 40, 45]);
    expect(points.map((p) => p.solverSecondsToDate)).toEqual([1.5, 1.5, 9.75, 9.85]);
  });

  it('draws an even pace that reaches the quota on the last day', () => {
    expect(points.map((p) => p.runsPace)).toEqual([25, 50, 75, 100]);
    expect(points[3].solverSecondsPace).toBe(40);
  });

  it('stops both lines after the given day', () => {
    const cut = usagePoints(days, { runs: 100, solverSeconds: 40 }, '2026-12-02');
    expect(cut.map((p) => p.runsToDate)).toEqual([10, 10, null, null]);
    expect(cut.map((p) => p.runsPace)).toEqual([25, 50, null, null]);
    expect(cut[3].runs).toBe(5);
  });

  it('handles an empty period', () => {
    expect(usagePoints([], { runs: 1, solverSeconds: 1 })).toEqual([]);
  });
});
