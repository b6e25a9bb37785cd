import { afterAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import type { SolverPort } from '../../api/src/engine/solver-port';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { gridTiedSolarSite, resolve } from './synthetic-sites';

const pool = new HighsSolverPool({ size: 1 });
afterAll(() => pool.close());

/**
 * The real pool, except that its `failAt`-th window solve (a pricing LP, asked for duals, is not a
 * window solve) answers as HiGHS does when the time runs out before a first incumbent. Which
 * window runs out depends on the machine; this fixes it, so the failure path is checked without timing.
 */
function outOfTimeAt(failAt: number): SolverPort {
  let windowSolves = 0;
  return {
    concurrency: pool.concurrency,
    describe: () => pool.describe(),
    async solve(model, request) {
      const reply = await pool.solve(model, request);
      if (request.wantDuals || ++windowSolves !== failAt) return reply;
      return { ...reply, status: 'time-limit', solverStatus: 'HiGHS model status 13', colValue: null, objective: null, dualBound: null, mipGap: null };
    },
  };
}

describe('a rolling run that runs out of time', () => {
  it('fails as no-solution and says how many of its windows had a schedule and what limit would do', async () => {
    // Four days hourly in windows of 36 steps keeping 24: windows start at steps 0, 24, 48 and 72.
    const spec = resolve(gridTiedSolarSite({ days: 4, stepMinutes: 60, mode: 'rolling' }));
    const r = await solveSite(spec, { solver: outOfTimeAt(3) });
    expect(r.outcome).toBe('no-solution');
    expect(r.schedule).toBeNull();
    expect(r.warnings).toEqual([
      expect.objectContaining({
        code: 'time-limit',
        pointer: '/solver/timeLimitSeconds',
        // 2 of 4 windows in the 60 s default limit: about 60 × 4 ÷ 2 = 120 s for the whole horizon.
        message: expect.stringContaining('for steps 48–83. 2 of 4 rolling windows had a schedule by then; at that pace the whole horizon needs about 120 s'),
      }),
    ]);
  }, 600_000);
});
