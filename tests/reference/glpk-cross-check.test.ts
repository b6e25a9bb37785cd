/**
 * The engine (HiGHS, with its reductions) against an independent general-purpose solver: GLPK
 * (glpk.js 5.0) on our own plain formulation of SPEC.md §2 (support/plain-formulation.ts),
 * over random small valid specs. Both solve to a 1e-9 MIP gap, so the optima must agree;
 * feasibility must agree too. Every engine schedule must pass the independent verifier, and
 * the verifier's objective must be the one the engine reports.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { arbitraryResolvedSpec } from './support/arbitrary-spec';
import { PROPERTY_TIMEOUT_MS, expectVerifiedOptimum, propertyRuns, sameOptimum } from './support/check-result';
import { solvePlain } from './support/plain-formulation';

const solver = new HighsSolverPool({ size: defaultSolverThreads() });
afterAll(() => solver.close());

describe('engine vs plain GLPK on random small specs', () => {
  it('agree on feasibility and on the optimum', async () => {
    let feasible = 0;
    await fc.assert(
      fc.asyncProperty(arbitraryResolvedSpec(), async (spec) => {
        const plain = await solvePlain(spec, { mipGap: 1e-9, timeLimitSeconds: 20 });
        const result = await solveSite(spec, { solver });
        if (plain.status === 'infeasible') {
          expect(result.outcome).toBe('infeasible');
          return;
        }
        expect(plain.status).toBe('optimal');
        expect(verifySchedule(spec, plain.schedule).violations).toEqual([]);
        const value = expectVerifiedOptimum(spec, result);
        expect(sameOptimum(value, plain.objective), `engine ${value} vs GLPK ${plain.objective}`).toBe(true);
        feasible++;
      }),
      propertyRuns(40),
    );
    // The generator must mostly produce solvable sites, or this check would say little.
    expect(feasible).toBeGreaterThan(20);
  }, PROPERTY_TIMEOUT_MS);
});
