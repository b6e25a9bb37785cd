// Valid-by-the-letter specs found by fuzzing that the engine mishandles: a model with nothing to
// decide, and finite numbers of absurd magnitude. SPEC.md §1 allows them (every number finite), so
// either the validator refuses them with a pointer, or the engine solves them to the right optimum.
import { afterAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { resolveDefaults, validateSiteSpec } from '../../shared/src/site-spec';

const horizon = { start: '2027-03-01T00:00:00+01:00', stepMinutes: 60, steps: 2 };
// Hand derivation (our own): supply 100 kW, hard load 20 kW, island, one flexible load worth
// 0.1/kWh rated R ≥ 80 kW ⇒ it takes the 80 kW surplus each hour ⇒ objective 2 h × 80 kW × 0.1 = 16.
const surplusSite = (unit: Record<string, unknown>, extra: Record<string, unknown> = {}) => ({
  horizon,
  supply: { availableKw: [100, 100] },
  siteLoad: { kw: [20, 20] },
  units: [{ id: 'ely-1', kind: 'flexible-load', ratingKw: 100, minStableKw: 10, valuePerKwh: 0.1, ...unit }],
  ...extra,
});

describe('engine edge cases found by fuzzing', () => {
  const solver = new HighsSolverPool();
  afterAll(async () => solver.close());

  async function solveOrRefuse(spec: unknown): Promise<{ refused: true } | { refused: false; outcome: string; objective: number | null }> {
    const v = validateSiteSpec(spec);
    if (!v.ok) {
      expect(v.errors[0].pointer).toMatch(/^\//);
      return { refused: true };
    }
    const r = await solveSite(resolveDefaults(v.spec), { solver });
    return { refused: false, outcome: r.outcome, objective: r.objective.value };
  }

  it('solves a site with nothing to decide (no units, storage, grid or supply) as optimal with objective 0', async () => {
    // Hand derivation: every variable is fixed at 0, so the only schedule is all zeros, objective 0.
    const r = await solveOrRefuse({ horizon, supply: { availableKw: [0, 0] } });
    expect(r).toEqual({ refused: false, outcome: 'optimal', objective: 0 });
  });

  it.each([
    ['nothing unusual (the baseline of the hand derivation)', surplusSite({})],
    ['minStableKw 1e-250', surplusSite({ minStableKw: 1e-250 })],
    ['a storage maxChargeKw of 1e-200', surplusSite({}, { storage: [{ id: 'bess-1', capacityKwh: 10, maxChargeKw: 1e-200, maxDischargeKw: 5, initialSocKwh: 5 }] })],
    ['a grid importLimitKw of 5e-323', surplusSite({}, { grid: { importLimitKw: 5e-323, exportLimitKw: 0, importPrice: 0.2 } })],
  ])('refuses or correctly solves a spec with %s (the tiny value cannot change the optimum of 16 by more than 1e-6)', async (_name, spec) => {
    const r = await solveOrRefuse(spec);
    if (!r.refused) {
      expect(r.outcome).toBe('optimal');
      expect(r.objective).toBeCloseTo(16, 4);
    }
  });

  it.each([
    ['ratingKw 1e300', surplusSite({ ratingKw: 1e300 })],
    ['supply of 1e300 kW in one step', surplusSite({}, { supply: { availableKw: [1e300, 100] } })],
  ])('refuses or correctly solves a spec with %s', async (name, spec) => {
    const r = await solveOrRefuse(spec);
    if (!r.refused) {
      expect(r.outcome).toBe('optimal');
      // With 1e300 kW of supply the unit is capped by its rating (100 kW) at step 0: 100·0.1 + 80·0.1 = 18.
      expect(r.objective).toBeCloseTo(name.startsWith('supply') ? 18 : 16, 4);
    }
  });
});
