/**
 * SPEC §5 on random small specs (support/arbitrary-spec.ts with `extensions`: curves, no-load,
 * hot/cold starts, ramps with initial output, spinning reserve from units and batteries, demand
 * charges in local-time windows across daylight-saving changes, supply-only charging, stores
 * with loss, shortfall and spill). Sources: GLPK (glpk.js 5.0) on our own plain formulation of
 * SPEC §2 and §5 (support/plain-formulation.ts), and our own reading of the ramp, reserve and
 * store rules (support/plain-schedule-checks.ts). Both solves run to a 1e-9 MIP gap, so the
 * optima must agree; feasibility must agree too.
 */
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { solveSite, type SiteSolution } from '../../api/src/engine/solve-site';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { arbitraryResolvedSpec } from './support/arbitrary-spec';
import { PROPERTY_TIMEOUT_MS, expectVerifiedOptimum, propertyRuns, reductionsHeldTo, sameOptimum } from './support/check-result';
import { solvePlain } from './support/plain-formulation';
import { rampBreaches, reserveBreaches, storeBreaches } from './support/plain-schedule-checks';
import { ALL_REDUCTIONS_OFF, ALL_REDUCTIONS_ON, monolithic } from './support/specs';

const solver = new HighsSolverPool({ size: defaultSolverThreads() });
afterAll(() => solver.close());

const solveWith = (spec: ResolvedSiteSpec, reductions: ResolvedSiteSpec['solver']['reductions']) =>
  solveSite(monolithic(spec, reductionsHeldTo(spec, reductions)), { solver });

function expectWithinSpecLimits(spec: ResolvedSiteSpec, schedule: Schedule) {
  expect(rampBreaches(spec, schedule), 'ramps').toEqual([]);
  expect(reserveBreaches(spec, schedule), 'reserve').toEqual([]);
  expect(storeBreaches(spec, schedule), 'stores').toEqual([]);
}

/** A verified optimum whose objective terms add up to it and whose schedule keeps every §5 limit. */
function expectSoundOptimum(spec: ResolvedSiteSpec, result: SiteSolution): number {
  const value = expectVerifiedOptimum(spec, result);
  const terms = Object.values(result.kpis!.objectiveTerms).reduce((sum, x) => sum + x, 0);
  expect(sameOptimum(terms, value), `objective terms sum to ${terms}, objective ${value}`).toBe(true);
  expectWithinSpecLimits(spec, result.schedule!);
  return value;
}

describe('SPEC §5 on random small specs', () => {
  it('the engine and the plain formulation in GLPK agree on feasibility and on the optimum', async () => {
    let feasible = 0;
    await fc.assert(
      fc.asyncProperty(arbitraryResolvedSpec({ extensions: true }), async (spec) => {
        const plain = await solvePlain(spec, { mipGap: 1e-9, timeLimitSeconds: 20 });
        const result = await solveWith(spec, ALL_REDUCTIONS_ON);
        if (plain.status === 'infeasible') {
          expect(result.outcome).toBe('infeasible');
          return;
        }
        expect(plain.status).toBe('optimal');
        // The plain model's own schedule is a sound one too: the two readings of SPEC agree.
        expect(verifySchedule(spec, plain.schedule).violations).toEqual([]);
        expectWithinSpecLimits(spec, plain.schedule);
        const value = expectSoundOptimum(spec, result);
        expect(sameOptimum(value, plain.objective), `engine ${value} vs GLPK ${plain.objective}`).toBe(true);
        feasible++;
      }),
      propertyRuns(40),
    );
    // The generator must mostly produce solvable sites, or this check would say little.
    expect(feasible).toBeGreaterThan(15);
  }, PROPERTY_TIMEOUT_MS);

  it('every reduction on and every reduction off reach the same optimum', async () => {
    await fc.assert(
      fc.asyncProperty(arbitraryResolvedSpec({ extensions: true }), async (spec) => {
        const on = await solveWith(spec, ALL_REDUCTIONS_ON);
        const off = await solveWith(spec, ALL_REDUCTIONS_OFF);
        expect(on.outcome === 'infeasible').toBe(off.outcome === 'infeasible');
        if (off.outcome === 'infeasible') return;
        const a = expectSoundOptimum(spec, on);
        const b = expectSoundOptimum(spec, off);
        expect(sameOptimum(a, b), `reductions on ${a} vs off ${b}`).toBe(true);
      }),
      propertyRuns(30),
    );
  }, PROPERTY_TIMEOUT_MS);
});
