/**
 * The horizon bound of rolling solves (api/src/engine/horizon-bound.ts): an upper bound on the
 * objective of every schedule the spec allows. Sources: the engine's own monolithic optimum and,
 * independently, GLPK (glpk.js 5.0) on our plain formulation of SPEC §2 and §5
 * (tests/reference/support/plain-formulation.ts), on random small specs with every §5 part
 * (support/arbitrary-spec.ts) cut into two-step blocks, so every link the bound relaxes — SOC,
 * store levels, on/off history, ramps, cold starts, demand-charge peaks — crosses block seams.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { Deadline } from '../../api/src/engine/deadline';
import { horizonBound } from '../../api/src/engine/horizon-bound';
import { siteFacts } from '../../api/src/engine/plan-window';
import { createScheduleBuffers } from '../../api/src/engine/schedule-buffers';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { arbitraryResolvedSpec } from '../reference/support/arbitrary-spec';
import { PROPERTY_TIMEOUT_MS, propertyRuns } from '../reference/support/check-result';
import { solvePlain } from '../reference/support/plain-formulation';
import { repeatedExample, resolve } from './synthetic-sites';

const solver = new HighsSolverPool({ size: defaultSolverThreads() });
afterAll(() => solver.close());

const rolling = (spec: ResolvedSiteSpec, windowSteps: number, commitSteps: number): ResolvedSiteSpec => ({
  ...spec,
  solver: { ...spec.solver, mode: 'rolling', mipGap: 1e-9, window: { ...spec.solver.window, windowSteps, commitSteps, segmentWindows: 0 } },
});
const monolithic = (spec: ResolvedSiteSpec): ResolvedSiteSpec => ({ ...spec, solver: { ...spec.solver, mode: 'monolithic', mipGap: 1e-9 } });

/** a ≥ b but for solver round-off: 1e-6 relative to max(1, |a|, |b|). */
const atLeast = (a: number, b: number) => a >= b - 1e-6 * Math.max(1, Math.abs(a), Math.abs(b));

describe('the horizon bound of a rolling solve', () => {
  it('is at least the optimum (engine and GLPK) and the rolling objective on random small specs with every §5 part', async () => {
    let bounded = 0;
    await fc.assert(
      fc.asyncProperty(
        arbitraryResolvedSpec({ extensions: true }).filter((s) => s.horizon.steps >= 3),
        async (spec) => {
          const rolled = await solveSite(rolling(spec, 2, 1), { solver });
          if (rolled.objective.value === null) return;
          expect(rolled.model.horizonBound, 'a bound report for every rolling schedule').not.toBeNull();
          expect(rolled.model.horizonBound!.reason).toBeNull();
          const bound = rolled.objective.bound!;
          expect(atLeast(bound, rolled.objective.value), `bound ${bound} vs rolling ${rolled.objective.value}`).toBe(true);
          const whole = await solveSite(monolithic(spec), { solver });
          expect(whole.outcome).toBe('optimal');
          expect(atLeast(bound, whole.objective.value!), `bound ${bound} vs engine optimum ${whole.objective.value}`).toBe(true);
          const plain = await solvePlain(spec, { mipGap: 1e-9, timeLimitSeconds: 20 });
          expect(plain.status).toBe('optimal');
          expect(atLeast(bound, plain.objective), `bound ${bound} vs GLPK optimum ${plain.objective}`).toBe(true);
          expect(rolled.objective.gap).toBeGreaterThanOrEqual(0);
          bounded++;
        },
      ),
      propertyRuns(60),
    );
    // The property must have met rolling schedules, not only specs without one.
    expect(bounded).toBeGreaterThan(10);
  }, PROPERTY_TIMEOUT_MS);

  it('relaxes a demand charge across blocks: the peak is shared out, never dropped', async () => {
    // Hand derivation: 4 hourly steps, load 100 kW at every step, import only (0.10/kWh), a demand
    // charge of 5 per kW over the whole horizon, no other source: the peak is 100 kW and the
    // objective −4·100·0.10 − 5·100 = −540. Blocks of 2 steps: each pays its share of the charge
    // on its own peak (100 kW), so the bound is exactly −540 — a block that paid no charge would
    // report −40.
    const spec = resolve({
      horizon: { start: '2027-01-04T00:00:00Z', stepMinutes: 60, steps: 4 },
      supply: { availableKw: [0, 0, 0, 0] },
      siteLoad: { kw: [100, 100, 100, 100] },
      grid: { importLimitKw: 200, importPrice: 0.1, demandCharges: [{ id: 'month', pricePerKw: 5 }] },
    });
    const r = await solveSite(rolling(spec, 2, 2), { solver });
    expect(r.objective.value).toBeCloseTo(-540, 6);
    expect(r.model.horizonBound!.blocks).toBe(2);
    // The bound carries LP_BOUND_MARGIN (1e-5 of each block's magnitude) above the exact −540.
    expect(r.objective.bound!).toBeGreaterThanOrEqual(-540);
    expect(r.objective.bound!).toBeLessThan(-539.9);
  });

  it('relaxes a battery’s SOC between blocks at the price of the rolling schedule', async () => {
    // Hand derivation: import at 0.10 in steps 0–1 and 0.30 in steps 2–3 (hourly), load 50 kW
    // throughout, a lossless 100 kWh battery (50 kW each way) starting empty. Optimum: charge
    // 50 kWh in each cheap step and cover the dear steps from the battery:
    // −2·(50 + 50)·0.10 = −20. Blocks of 2 steps meet between the cheap and dear steps, where a
    // kWh is worth 0.30 (the dear import it saves). Block 1: −20 to import and charge 100 kWh,
    // +0.30·100 for the SOC it ends with: +10. Block 2: −0.30·100 for the SOC it starts with, no
    // import: −30. Sum −20: priced right, the relaxed seam costs nothing.
    const spec = resolve({
      horizon: { start: '2027-01-04T00:00:00Z', stepMinutes: 60, steps: 4 },
      supply: { availableKw: [0, 0, 0, 0] },
      siteLoad: { kw: [50, 50, 50, 50] },
      grid: { importLimitKw: 200, importPrice: [0.1, 0.1, 0.3, 0.3] },
      storage: [{ id: 'bat', capacityKwh: 100, maxChargeKw: 50, maxDischargeKw: 50, initialSocKwh: 0 }],
    });
    const r = await solveSite(rolling(spec, 2, 2), { solver });
    expect(r.model.horizonBound!.blocks).toBe(2);
    expect(r.objective.bound!).toBeGreaterThanOrEqual(-20);
    expect(r.objective.bound!).toBeLessThan(-19.99);
    expect(atLeast(r.objective.bound!, r.objective.value!)).toBe(true);
  });

  it('holds on three days of the power-to-X and pump-station demo sites', async () => {
    for (const id of ['grid-electrolyser', 'solar-pump-station']) {
      const days = repeatedExample(id, 3, { timeLimitSeconds: 300 });
      const rolled = await solveSite({ ...days, solver: { ...days.solver, mode: 'rolling' } }, { solver });
      const whole = await solveSite({ ...days, solver: { ...days.solver, mode: 'monolithic' } }, { solver });
      expect(rolled.model.horizonBound!.reason, id).toBeNull();
      expect(atLeast(rolled.objective.bound!, whole.objective.value!), `${id}: bound ${rolled.objective.bound} vs whole ${whole.objective.value}`).toBe(true);
      expect(atLeast(rolled.objective.bound!, rolled.objective.value!), id).toBe(true);
    }
  });

  it('reports no number, but a reason, when the run’s time is up before the blocks are solved', async () => {
    const spec = rolling(
      resolve({
        horizon: { start: '2027-01-04T00:00:00Z', stepMinutes: 60, steps: 4 },
        supply: { availableKw: [10, 0, 10, 0] },
        siteLoad: { kw: [5, 5, 5, 5] },
        grid: { importLimitKw: 20, importPrice: 0.2 },
      }),
      2,
      2,
    );
    const passed = Deadline.after(0);
    const r = await horizonBound({ spec, facts: siteFacts(spec), schedule: createScheduleBuffers(spec), solver, deadline: passed }, 10);
    expect(r.value).toBeNull();
    expect(r.reason).toMatch(/time limit/);
  });
});
