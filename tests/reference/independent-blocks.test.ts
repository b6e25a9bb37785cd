/**
 * The `independentBlocks` reduction solves the parts of a model that no constraint links apart,
 * in parallel, and adds their optima. Checked two ways: a hand-derived case that is 60 copies
 * of the sparse-set-gap reference case (../shared/reference-cases, confirmed there by CBC and
 * GLPK), whose optimum is therefore 60 times that case's; and random sites without storage
 * whose nights split them, solved split and whole.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { PROPERTY_TIMEOUT_MS, expectVerifiedOptimum, propertyRuns, sameOptimum } from './support/check-result';
import { ALL_REDUCTIONS_ON, closeRel, monolithic, resolveSpec } from './support/specs';

const solver = new HighsSolverPool({ size: defaultSolverThreads() });
afterAll(() => solver.close());

const DAY = [0, 3000, 12000, 1500, 8000, 0];

describe('independent blocks', () => {
  it('60 copies of the sparse-set-gap day reach 60 × 780 = 46 800, solved in several blocks', async () => {
    // The reference derivation: in one copy the load can run at steps 1, 2 and 4 only (below
    // 2 000 kW elsewhere): 0.04 · (3 000 + 10 000 + 8 000) = 840 less two starts of 30 = 780.
    // Each copy ends and the next begins with a step of no supply, so every copy is
    // independent of the others (minimum down time 1) and the optimum is 60 · 780.
    const days = 60;
    const spec = monolithic(
      resolveSpec({
        horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: days * DAY.length },
        supply: { availableKw: Array.from({ length: days }, () => DAY).flat() },
        units: [{ id: 'u', kind: 'flexible-load', ratingKw: 10000, minStableKw: 2000, valuePerKwh: 0.04, startupCost: 30 }],
      }),
      ALL_REDUCTIONS_ON,
    );
    const r = await solveSite(spec, { solver });
    const value = expectVerifiedOptimum(spec, r);
    expect(closeRel(value, days * 780), `${value}`).toBe(true);
    expect(r.model.windows[0].blocks).toBeGreaterThan(1);
    expect(r.kpis!.units.u.starts).toBe(2 * days);
    // The run at steps 1–2 and the one at step 4 of each copy, as in the reference schedule.
    expect(r.schedule!.units.u.on.slice(0, 12)).toEqual([0, 1, 1, 0, 1, 0, 0, 1, 1, 0, 1, 0]);
  });

  it('split and whole agree on random sites whose nights separate their days', async () => {
    let split = 0;
    const site = fc.record({
      days: fc.integer({ min: 4, max: 8 }),
      peakKw: fc.integer({ min: 100, max: 600 }),
      clouds: fc.array(fc.integer({ min: 20, max: 100 }), { minLength: 8, maxLength: 8 }),
      units: fc.array(
        fc.record({
          ratingKw: fc.integer({ min: 50, max: 400 }),
          minStableShare: fc.constantFrom(0.2, 0.4, 0.6),
          valuePerKwh: fc.integer({ min: 1, max: 20 }).map((x) => x / 100),
          startupCost: fc.constantFrom(0, 2, 10),
          minUpSteps: fc.integer({ min: 1, max: 4 }),
          minDownSteps: fc.integer({ min: 1, max: 3 }),
        }),
        { minLength: 1, maxLength: 3 },
      ),
    });
    await fc.assert(
      fc.asyncProperty(site, async (s) => {
        // Hourly sun from 06:00 to 18:00, a cloud factor per day; no grid, no storage.
        const steps = s.days * 24;
        const supply = Array.from({ length: steps }, (_, t) => {
          const hour = t % 24;
          const sun = hour >= 6 && hour < 18 ? Math.sin((Math.PI * (hour - 5.5)) / 13) : 0;
          return Math.round(s.peakKw * sun * (s.clouds[Math.floor(t / 24)] / 100));
        });
        const spec: ResolvedSiteSpec = resolveSpec({
          horizon: { start: '2027-06-01T00:00:00Z', stepMinutes: 60, steps },
          supply: { availableKw: supply },
          units: s.units.map((u, i) => ({
            id: `u${i}`,
            kind: 'flexible-load',
            ratingKw: u.ratingKw,
            minStableKw: Math.round(u.ratingKw * u.minStableShare),
            valuePerKwh: u.valuePerKwh,
            startupCost: u.startupCost,
            minUpSteps: u.minUpSteps,
            minDownSteps: u.minDownSteps,
          })),
          solver: { mode: 'monolithic', mipGap: 1e-9, timeLimitSeconds: 30 },
        });
        const on = await solveSite(monolithic(spec, ALL_REDUCTIONS_ON), { solver });
        const whole = await solveSite(monolithic(spec, { ...ALL_REDUCTIONS_ON, independentBlocks: false }), { solver });
        const a = expectVerifiedOptimum(spec, on);
        const b = expectVerifiedOptimum(spec, whole);
        expect(whole.model.windows[0].blocks).toBe(1);
        if (on.model.windows[0].blocks > 1) split++;
        expect(sameOptimum(a, b), `split ${a} vs whole ${b}`).toBe(true);
      }),
      propertyRuns(20),
    );
    // Most of these sites must split, or the check says little about splitting.
    expect(split).toBeGreaterThan(10);
  }, PROPERTY_TIMEOUT_MS);
});
