import { afterAll, describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { buildWindowModel } from '../../api/src/engine/build-window-model';
import { initialState } from '../../api/src/engine/carry-state';
import { Deadline } from '../../api/src/engine/deadline';
import { monolithicWindow } from '../../api/src/engine/horizon-windows';
import type { ModelArrays } from '../../api/src/engine/model-arrays';
import { planWindow, siteFacts } from '../../api/src/engine/plan-window';
import { solveSite } from '../../api/src/engine/solve-site';
import { SolveAbortedError } from '../../api/src/engine/solver-port';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { gridTiedSolarSite, resolve } from './synthetic-sites';

const pool = new HighsSolverPool({ solvesPerWorker: 2 });
afterAll(() => pool.close());

const small = () =>
  resolve({
    horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 3 },
    supply: { availableKw: [1, 2, 3] },
    units: [{ id: 'u', kind: 'flexible-load', ratingKw: 2, minStableKw: 1, valuePerKwh: 1 }],
  });

/**
 * One hour of a site with a 5 kWh load, served by grid import (0.1 per kWh, at most 3 kWh) and
 * a diesel generator (0.3 per kWh), maximising minus the cost. Columns: import g, diesel d.
 * Rows: the balance g + d = 5, and the import limit g ≤ 3 written as a row so it has a dual.
 */
function dispatchLp(dieselIsBinary = false): ModelArrays {
  return {
    numCols: 2,
    numRows: 2,
    colCost: Float64Array.from([-0.1, -0.3]),
    colLower: Float64Array.from([0, 0]),
    colUpper: Float64Array.from([Infinity, dieselIsBinary ? 1 : Infinity]),
    integrality: Int32Array.from([0, dieselIsBinary ? 1 : 0]),
    rowLower: Float64Array.from([5, -Infinity]),
    rowUpper: Float64Array.from([5, 3]),
    starts: Int32Array.from([0, 2, 3]),
    indices: Int32Array.from([0, 1, 0]),
    values: Float64Array.from([1, 1, 1]),
  };
}

describe('HiGHS solver pool', () => {
  it('interrupts the solve on abort, rejects with SolveAbortedError, and keeps serving on the same thread', async () => {
    const own = new HighsSolverPool({ size: 1 });
    try {
      const big = resolve(gridTiedSolarSite({ days: 30, stepMinutes: 60, mode: 'monolithic' }));
      const controller = new AbortController();
      const pending = solveSite(big, { solver: own, signal: controller.signal });
      setTimeout(() => controller.abort(), 300);
      await expect(pending).rejects.toBeInstanceOf(SolveAbortedError);
      // Hand check: 1 + 2 + 2 kWh at value 1.
      const r = await solveSite(small(), { solver: own });
      expect(r.objective.value).toBeCloseTo(5, 9);
      // HiGHS stopped at its interrupt check: the thread was not replaced.
      expect(own.threadsStarted).toBe(1);
    } finally {
      await own.close();
    }
  });

  it('stops a MIP at its first incumbent once past stopWithSolutionBy, and otherwise solves it to the gap', async () => {
    // The island demo as one model: its LP bound sits a few per cent from the optimum, so HiGHS
    // holds incumbents long before it proves one within the gap.
    const spec = resolve(exampleSites.find((e) => e.id === 'island-microgrid')!.spec as any);
    const window = monolithicWindow(spec)[0];
    const { model } = buildWindowModel(planWindow(spec, siteFacts(spec), window, initialState(spec)));
    const hard = () => Deadline.after(600);

    const early = await pool.solve(model, { deadline: hard(), stopWithSolutionBy: Deadline.after(0), mipGap: 1e-4 });
    expect(early.status).toBe('time-limit');
    expect(early.killedAtDeadline).toBe(false);
    expect(early.colValue).not.toBeNull();
    expect(early.mipGap!).toBeGreaterThan(1e-4);

    const full = await pool.solve(model, { deadline: hard(), mipGap: 1e-4 });
    expect(full.status).toBe('optimal');
    expect(full.mipGap!).toBeLessThanOrEqual(1e-4);
    // The first incumbent is a schedule, not the optimum: never better than it.
    expect(early.objective!).toBeLessThanOrEqual(full.objective! + 1e-6 * Math.abs(full.objective!));
  }, 600_000);

  it("takes a MIP start: given the optimum's on/off values alone, it completes them into a schedule", async () => {
    const spec = resolve(exampleSites.find((e) => e.id === 'island-microgrid')!.spec as any);
    const window = monolithicWindow(spec)[0];
    const built = buildWindowModel(planWindow(spec, siteFacts(spec), window, initialState(spec)));
    const hard = () => Deadline.after(600);
    const full = await pool.solve(built.model, { deadline: hard(), mipGap: 1e-4 });
    expect(full.status).toBe('optimal');

    // Every other column left open (NaN): HiGHS finds their values for these on/off values.
    const start = new Float64Array(built.model.numCols).fill(NaN);
    for (const u of built.columns.units) for (const c of u.on) if (c >= 0) start[c] = Math.round(full.colValue![c]);
    const lines: string[] = [];
    const taken = await pool.solve(built.model, { deadline: hard(), stopWithSolutionBy: Deadline.after(0), mipGap: 1e-4, mipStart: start, onLog: (l) => lines.push(l) });
    expect(lines.join('')).toMatch(/MIP start solution is feasible/);
    expect(taken.colValue).not.toBeNull();
    // Its schedule keeps the start's on/off values; HiGHS's completion of the rest is feasible, not
    // necessarily the best for them, and it stopped at once, so it is never better than the optimum.
    for (const u of built.columns.units) for (const c of u.on) if (c >= 0) expect(Math.round(taken.colValue![c])).toBe(start[c]);
    expect(taken.objective!).toBeLessThanOrEqual(full.objective! + 1e-6 * Math.abs(full.objective!));

    // A start that breaks a bound (an on/off value of 2) is dropped, and the solve goes on to the optimum.
    const wrong = start.slice();
    wrong[built.columns.units[0].on.find((c) => c >= 0)!] = 2;
    const rejected: string[] = [];
    const after = await pool.solve(built.model, { deadline: hard(), mipGap: 1e-4, mipStart: wrong, onLog: (l) => rejected.push(l) });
    expect(rejected.join('')).not.toMatch(/MIP start solution is feasible/);
    expect(after.status).toBe('optimal');
    expect(after.objective!).toBeCloseTo(full.objective!, 3);
  }, 600_000);

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
    expect(pool.concurrency).toBe(1);
    const r = await solveSite(small(), { solver: pool });
    expect(r.model.solver.name).toBe('HiGHS');
    expect(r.model.solver.version).toMatch(/^\d+\.\d+\.\d+/);
  });

  it("returns an LP's row duals as the marginal value of each row's bound (hand derivation)", async () => {
    // Import is cheaper, so it runs at its 3 kWh limit and diesel covers the other 2 kWh:
    // objective −(0.1·3 + 0.3·2) = −0.9. One more kWh of load must come from diesel, so the
    // balance row's dual is −0.3 (energy at this step is worth 0.3). One more kWh of import
    // limit replaces a kWh of diesel, 0.3 − 0.1 = +0.2, so the limit row's dual is 0.2.
    const r = await pool.solve(dispatchLp(), { deadline: Deadline.after(10), mipGap: 0, wantDuals: true });
    expect(r.status).toBe('optimal');
    expect(Array.from(r.colValue!)).toEqual([expect.closeTo(3, 9), expect.closeTo(2, 9)]);
    expect(r.objective).toBeCloseTo(-0.9, 9);
    expect(Array.from(r.rowDual!)).toEqual([expect.closeTo(-0.3, 9), expect.closeTo(0.2, 9)]);
  });

  it('returns no duals unless asked, nor for a MIP', async () => {
    const unasked = await pool.solve(dispatchLp(), { deadline: Deadline.after(10), mipGap: 0 });
    expect(unasked.status).toBe('optimal');
    expect(unasked.rowDual).toBeNull();
    // Diesel as a 0/1 column (1 kWh or nothing) and a 4 kWh load: import 3 + diesel 1, objective −0.6.
    const mip = await pool.solve({ ...dispatchLp(true), rowLower: Float64Array.from([4, -Infinity]), rowUpper: Float64Array.from([4, 3]) }, {
      deadline: Deadline.after(10),
      mipGap: 0,
      wantDuals: true,
    });
    expect(mip.status).toBe('optimal');
    expect(mip.objective).toBeCloseTo(-0.6, 9);
    expect(mip.rowDual).toBeNull();
  });
});
