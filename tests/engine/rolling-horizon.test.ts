import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { solveSite } from '../../api/src/engine/solve-site';
import { gridTiedSolarSite, resolve } from './synthetic-sites';

const pool = new HighsSolverPool();
afterAll(() => pool.close());

/** 30 days hourly, solar + daily load + day/night prices + a battery (no units, so each solve is an LP). */
function thirtyDaySite(mode: 'monolithic' | 'rolling'): ResolvedSiteSpec {
  const spec = resolve(gridTiedSolarSite({ days: 30, stepMinutes: 60, mode }));
  spec.units = [];
  return spec;
}

/** On/off blocks of a schedule: [state, first step, length]. */
function blocks(on: number[]): [number, number, number][] {
  const out: [number, number, number][] = [];
  for (let t = 0; t < on.length; t++) {
    const last = out[out.length - 1];
    if (last && last[0] === on[t]) last[2]++;
    else out.push([on[t], t, 1]);
  }
  return out;
}

describe('rolling horizon', () => {
  it('stays within 1 % of the monolithic optimum on 30 days hourly with storage, and never above it', async () => {
    const mono = await solveSite(thirtyDaySite('monolithic'), { solver: pool });
    const progress: number[] = [];
    const rolling = await solveSite(thirtyDaySite('rolling'), { solver: pool, onProgress: (p) => progress.push(p.windowsDone) });
    expect(mono.outcome).toBe('optimal');
    expect(rolling.outcome).toBe('feasible');
    expect(rolling.model.mode).toBe('rolling');
    // Default windows: 36 h solved, 24 h kept ⇒ 29 windows of 24 and a final 24 h window.
    expect(rolling.model.windows).toHaveLength(30);
    expect(progress.at(-1)).toBe(30);
    const m = mono.objective.value!;
    const r = rolling.objective.value!;
    // A feasible schedule of the same problem cannot beat its optimum (up to the MIP gap).
    expect(r).toBeLessThanOrEqual(m + Math.abs(m) * 1e-4 + 1e-6);
    expect(Math.abs(m - r)).toBeLessThanOrEqual(0.01 * Math.abs(m));
  });

  it('keeps storage filled for a hard island load that only the battery serves after dark', async () => {
    // Sun in the first 12 hours of each day, a hard 10 kW load, an empty battery, windows of 18
    // hours keeping 12. The first window sees only 6 hours of night; were stored energy worth
    // nothing at its end, it would charge for those 6 hours alone and leave the next window
    // 60 kWh short of the night's 120 kWh — infeasible, though the spec is not.
    const steps = 48;
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps },
      supply: { availableKw: Array.from({ length: steps }, (_, t) => (t % 24 < 12 ? 100 : 0)) },
      siteLoad: { kw: new Array(steps).fill(10) },
      storage: [{ id: 'bess', capacityKwh: 200, maxChargeKw: 50, maxDischargeKw: 50, initialSocKwh: 0 }],
      solver: { mode: 'rolling', window: { windowSteps: 18, commitSteps: 12, segmentWindows: 0 } },
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('feasible');
    // After the first day's sun (step 11) the battery holds at least the night's 120 kWh.
    expect(r.schedule!.storage.bess.socKwh[11]).toBeGreaterThanOrEqual(120 - 1e-6);
  });

  it('keeps minimum up and down times across window seams', async () => {
    // A 40 kW generator, min up 4 and min down 3, selling into the grid at a price that is
    // attractive in isolated steps only; windows of 7 steps committing 5 put seams at 5, 10, 15 ….
    const steps = 30;
    const exportPrice = Array.from({ length: steps }, (_, t) => (t % 5 === 4 || t % 7 === 0 ? 0.5 : 0.05));
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps },
      supply: { availableKw: new Array(steps).fill(0) },
      grid: { exportLimitKw: 100, exportPrice },
      units: [{ id: 'gen', kind: 'generator', ratingKw: 40, minStableKw: 30, costPerKwh: 0.2, startupCost: 1, minUpSteps: 4, minDownSteps: 3, initial: { on: true, stepsInState: 2 } }],
      solver: { mode: 'rolling', window: { windowSteps: 7, commitSteps: 5 } },
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('feasible');
    const on = r.schedule!.units.gen.on;
    const bs = blocks(on);
    bs.forEach(([state, from, length], i) => {
      const reachesEnd = from + length === steps;
      if (reachesEnd) return;
      // The first block continues the initial state: on for 2 steps already ⇒ at least 2 more.
      const need = state === 1 ? (i === 0 ? 2 : 4) : 3;
      expect(length, `block ${state ? 'on' : 'off'} at step ${from}`).toBeGreaterThanOrEqual(need);
    });
    expect(bs.length).toBeGreaterThan(2);
    const mono = await solveSite({ ...spec, solver: { ...spec.solver, mode: 'monolithic' } }, { solver: pool });
    expect(r.objective.value!).toBeLessThanOrEqual(mono.objective.value! + 1e-6);
  });
});
