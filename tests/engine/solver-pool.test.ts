import { afterAll, describe, expect, it } from 'vitest';
import { SolveAbortedError, SolverPool } from '../../api/src/engine/solver-pool';
import { solveSite } from '../../api/src/engine/solve-site';
import { gridTiedSolarSite, resolve } from './synthetic-sites';

const pool = new SolverPool({ solvesPerWorker: 2 });
afterAll(() => pool.close());

const small = () =>
  resolve({
    horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 3 },
    supply: { availableKw: [1, 2, 3] },
    units: [{ id: 'u', kind: 'flexible-load', ratingKw: 2, minStableKw: 1, valuePerKwh: 1 }],
  });

describe('solver pool', () => {
  it('terminates the worker on abort, rejects with SolveAbortedError, and keeps serving', async () => {
    const big = resolve(gridTiedSolarSite({ days: 30, stepMinutes: 60, mode: 'monolithic' }));
    const controller = new AbortController();
    const pending = solveSite(big, { solver: pool, signal: controller.signal });
    setTimeout(() => controller.abort(), 300);
    await expect(pending).rejects.toBeInstanceOf(SolveAbortedError);
    // Hand check: 1 + 2 + 2 kWh at value 1.
    const r = await solveSite(small(), { solver: pool });
    expect(r.objective.value).toBeCloseTo(5, 9);
  });

  it('recycles workers after their quota of solves without losing results', async () => {
    const values: number[] = [];
    for (let i = 0; i < 5; i++) values.push((await solveSite(small(), { solver: pool })).objective.value!);
    expect(values).toEqual([5, 5, 5, 5, 5]);
  });

  it('rejects at once when the signal is already aborted', async () => {
    const controller = new AbortController();
    controller.abort();
    await expect(solveSite(small(), { solver: pool, signal: controller.signal })).rejects.toBeInstanceOf(SolveAbortedError);
  });

  it('reports the HiGHS version of the WebAssembly build', async () => {
    const r = await solveSite(small(), { solver: pool });
    expect(r.model.solver.name).toBe('HiGHS');
    expect(r.model.solver.version).toMatch(/^\d+\.\d+\.\d+/);
  });
});
