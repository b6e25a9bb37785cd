/**
 * Properties of the formulation techniques (SPEC.md §2: "none may change the optimum"), on
 * random small valid specs: the optimum with every reduction on equals the optimum with every
 * reduction off, and relaxExclusivity never returns a schedule that charges and discharges, or
 * imports and exports, in one step — including with negative import prices and with equal
 * import and export prices, where doing both at once is worth something or costs nothing.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { arbitraryResolvedSpec } from './support/arbitrary-spec';
import { PROPERTY_TIMEOUT_MS, expectVerifiedOptimum, propertyRuns, sameOptimum, simultaneousUse } from './support/check-result';
import { ALL_REDUCTIONS_OFF, ALL_REDUCTIONS_ON, monolithic } from './support/specs';

const solver = new HighsSolverPool({ size: defaultSolverThreads() });
afterAll(() => solver.close());

describe('formulation reductions', () => {
  it('never change the optimum (every reduction on vs every reduction off)', async () => {
    await fc.assert(
      fc.asyncProperty(arbitraryResolvedSpec(), async (spec) => {
        const on = await solveSite(monolithic(spec, ALL_REDUCTIONS_ON), { solver });
        const off = await solveSite(monolithic(spec, ALL_REDUCTIONS_OFF), { solver });
        expect(on.outcome === 'infeasible').toBe(off.outcome === 'infeasible');
        if (off.outcome === 'infeasible') return;
        const a = expectVerifiedOptimum(spec, on);
        const b = expectVerifiedOptimum(spec, off);
        expect(sameOptimum(a, b), `reductions on ${a} vs off ${b}`).toBe(true);
      }),
      propertyRuns(30),
    );
  }, PROPERTY_TIMEOUT_MS);

  it('relaxExclusivity never charges and discharges, or imports and exports, in one step', async () => {
    await fc.assert(
      fc.asyncProperty(arbitraryResolvedSpec({ exclusivityStress: true }), async (spec) => {
        const relaxed = await solveSite(monolithic(spec, { ...ALL_REDUCTIONS_OFF, relaxExclusivity: true }), { solver });
        if (relaxed.outcome === 'infeasible') return;
        expectVerifiedOptimum(spec, relaxed);
        expect(simultaneousUse(spec, relaxed.schedule!)).toEqual([]);
        const strict = await solveSite(monolithic(spec, ALL_REDUCTIONS_OFF), { solver });
        expect(sameOptimum(relaxed.objective.value!, strict.objective.value!)).toBe(true);
      }),
      propertyRuns(30),
    );
  }, PROPERTY_TIMEOUT_MS);

  it('relaxExclusivity with every other reduction on keeps exclusivity too', async () => {
    await fc.assert(
      fc.asyncProperty(arbitraryResolvedSpec({ exclusivityStress: true }), async (spec) => {
        const r = await solveSite(monolithic(spec, ALL_REDUCTIONS_ON), { solver });
        if (r.outcome === 'infeasible') return;
        expectVerifiedOptimum(spec, r);
        expect(simultaneousUse(spec, r.schedule!)).toEqual([]);
      }),
      propertyRuns(20),
    );
  }, PROPERTY_TIMEOUT_MS);
});
