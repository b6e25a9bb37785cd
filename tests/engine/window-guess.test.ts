import { afterAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import type { SolverPort } from '../../api/src/engine/solver-port';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { gridTiedSolarSite, resolve } from './synthetic-sites';

const pool = new HighsSolverPool({ size: 1 });
afterAll(() => pool.close());

/**
 * The real pool, recording the MIP start each MIP solve is given (a pricing LP, asked for duals,
 * is not recorded), except that its `shortAt`-th window solve answers as HiGHS does
 * when a window's share runs out before the gap: a schedule, not proven. Which window runs short
 * depends on the machine; this fixes it, so the rule is checked without timing.
 */
function shareRunsOutAt(shortAt: number): SolverPort & { starts: (Float64Array | undefined)[] } {
  const starts: (Float64Array | undefined)[] = [];
  return {
    starts,
    concurrency: pool.concurrency,
    describe: () => pool.describe(),
    async solve(model, request) {
      const reply = await pool.solve(model, request);
      if (request.wantDuals) return reply;
      starts.push(request.mipStart);
      return starts.length === shortAt ? { ...reply, status: 'time-limit', mipGap: 0.05 } : reply;
    },
  };
}

describe('a rolling window after one that ran out of its share', () => {
  it("starts from yesterday's commitment; other windows start from nothing", async () => {
    // Four days hourly in windows of 36 steps keeping 24: windows start at steps 0, 24, 48 and 72.
    // The second window runs short, so the third (from step 48) is given the chiller's on/off value
    // at the same hour a day earlier: steps 24–47 for its first 24 steps, 24–35 for the last 12.
    const spec = resolve(gridTiedSolarSite({ days: 4, stepMinutes: 60, mode: 'rolling' }));
    const solver = shareRunsOutAt(2);
    const r = await solveSite(spec, { solver });
    expect(r.model.windows.map((w) => w.outcome)).toEqual(['optimal', 'feasible', 'optimal', 'optimal']);
    // The four windows' solves come first; the horizon bound's blocks after them never get a guess.
    expect(solver.starts.map((s) => s !== undefined)).toEqual([false, false, true, false, ...solver.starts.slice(4).map(() => false)]);

    const given = Array.from(solver.starts[2]!).filter((v) => !Number.isNaN(v));
    const on = r.schedule!.units.chiller.on;
    const yesterday = Array.from({ length: 36 }, (_, k) => on[24 + (k % 24)]);
    // Only the chiller's on/off columns carry a value, one per step, made in step order.
    expect(given).toEqual(yesterday);
    expect(new Set(yesterday).size).toBe(2);
  }, 600_000);
});
