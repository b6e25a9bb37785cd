import { afterAll, describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { MAX_TIME_LIMIT_SECONDS, resolveDefaults, validateSiteSpec } from '@gridwright/shared/site-spec';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { solveSite } from '../../api/src/engine/solve-site';
import { estimateModelSize } from '../../api/src/engine/estimate-model-size';

const pool = new HighsSolverPool();
afterAll(() => pool.close());

/** Common practice (HiGHS's numerics guidance): keep every coefficient kind within a few orders of magnitude of 1. */
const FEW_ORDERS = 1e3;

describe('demo sites', () => {
  it('ships the four invented sites', () => {
    expect(exampleSites.map((e) => e.id)).toEqual(expect.arrayContaining(['solar-pump-station', 'island-microgrid', 'grid-electrolyser', 'warehouse-demand-charge']));
  });

  for (const example of exampleSites) {
    it(`${example.id} validates, solves to optimality and reports a well-scaled model`, async () => {
      const checked = validateSiteSpec(example.spec);
      expect(checked.ok).toBe(true);
      if (!checked.ok) return;
      const resolved = resolveDefaults(checked.spec);
      // The longest time limit: the check waits for the proof, so a busy machine cannot turn it into a time-limit result.
      const spec = { ...resolved, solver: { ...resolved.solver, timeLimitSeconds: MAX_TIME_LIMIT_SECONDS } };
      expect(spec.horizon.steps).toBeGreaterThanOrEqual(24);
      expect(spec.horizon.steps).toBeLessThanOrEqual(96);
      const r = await solveSite(spec, { solver: pool });
      expect(r.outcome).toBe('optimal');
      expect(r.warnings).toEqual([]);
      expect(r.objective.gap!).toBeLessThanOrEqual(spec.solver.mipGap);

      for (const [kind, span] of Object.entries(r.model.coefficientRange)) {
        expect(span, kind).not.toBeNull();
        expect(span![1] / span![0], kind).toBeLessThanOrEqual(FEW_ORDERS);
      }
      // tightBigM: no big-M above the rating or limit it guards.
      for (const m of r.model.bigM) {
        const unit = spec.units.find((u) => m.where.startsWith(`${u.id} `));
        const storage = spec.storage.find((s) => m.where.startsWith(`${s.id} `));
        if (unit) expect(m.value, m.where).toBeLessThanOrEqual(unit.ratingKw);
        else if (storage) expect(m.value, m.where).toBeLessThanOrEqual(Math.max(storage.maxChargeKw, storage.maxDischargeKw));
        else expect(m.value, m.where).toBeLessThanOrEqual(Math.max(spec.grid.importLimitKw, spec.grid.exportLimitKw));
      }
      const estimate = estimateModelSize(spec);
      expect(estimate).toMatchObject({ mode: 'monolithic', windows: 1, variables: r.model.variables, constraints: r.model.constraints });
      expect(estimate.binaries.after).toBe(r.model.binaries);
      expect(estimate.binaries.before - estimate.binaries.after).toBe(r.model.binariesPruned);
    }, 600_000);
  }

  it('the naive model of a demo site spans far more orders of magnitude than the reduced one', async () => {
    const checked = validateSiteSpec(exampleSites.find((e) => e.id === 'grid-electrolyser')!.spec);
    if (!checked.ok) throw new Error('invalid example');
    const naive = resolveDefaults(checked.spec);
    naive.solver.reductions = { sparseSets: false, tightBigM: false, scaling: false, relaxExclusivity: false, independentBlocks: false };
    const reduced = resolveDefaults(checked.spec);
    const [a, b] = await Promise.all([solveSite(naive, { solver: pool }), solveSite(reduced, { solver: pool })]);
    const spread = (s: [number, number] | null) => (s ? s[1] / s[0] : 1);
    expect(spread(a.model.coefficientRange.matrix)).toBeGreaterThan(100 * spread(b.model.coefficientRange.matrix));
    expect(a.model.binaries).toBeGreaterThan(b.model.binaries);
    // The reductions never change the optimum (within the MIP gap).
    expect(b.objective.value!).toBeCloseTo(a.objective.value!, 1);
  });
});
