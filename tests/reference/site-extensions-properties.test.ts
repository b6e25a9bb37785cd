/**
 * SPEC §5 on random small specs (support/arbitrary-spec.ts with `extensions`: curves, no-load,
 * hot/cold starts, ramps with initial output, spinning reserve from units and batteries, demand
 * charges in local-time windows across daylight-saving changes, supply-only charging, stores
 * with loss, shortfall and spill). Sources: GLPK (glpk.js 5.0) and Debian's glpsol 5.0 and cbc
 * 2.10.8 on our own plain formulation of SPEC §2 and §5 (support/plain-formulation.ts, as
 * CPLEX-LP text for the command-line solvers, whose every answer is checked against the model),
 * and our own reading of the ramp, reserve and store rules (support/plain-schedule-checks.ts).
 * The engine and GLPK solve to a 1e-9 MIP gap, glpsol and cbc with their defaults (which close
 * these small models to round-off), so the optima must agree within 1e-6; feasibility too.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { solveSite, type SiteSolution } from '../../api/src/engine/solve-site';
import { verifySchedule } from '../../api/src/engine/verify-schedule';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { arbitraryResolvedSpec } from './support/arbitrary-spec';
import { PROPERTY_TIMEOUT_MS, expectVerifiedOptimum, propertyRuns, sameOptimum } from './support/check-result';
import { buildPlainModel, solvePlain } from './support/plain-formulation';
import { commandLineSolversPresent, solveLpText } from './support/plain-lp-text';
import { rampBreaches, reserveBreaches, storeBreaches } from './support/plain-schedule-checks';
import { ALL_REDUCTIONS_OFF, ALL_REDUCTIONS_ON, monolithic } from './support/specs';

const solver = new HighsSolverPool({ size: defaultSolverThreads() });
afterAll(() => solver.close());

const solveWith = (spec: ResolvedSiteSpec, reductions: ResolvedSiteSpec['solver']['reductions']) =>
  solveSite(monolithic(spec, reductions), { solver });

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

  describe.skipIf(!commandLineSolversPresent && !process.env.CI)('in Debian glpsol and cbc', () => {
    let dir = '';
    beforeAll(() => { dir = mkdtempSync(path.join(os.tmpdir(), 'gridwright-lp-props-')); });
    afterAll(() => rmSync(dir, { recursive: true, force: true }));

    it('glpsol and cbc on the plain formulation agree with the engine, with points that hold', async () => {
      let run = 0;
      await fc.assert(
        fc.asyncProperty(arbitraryResolvedSpec({ extensions: true }), async (spec) => {
          const result = await solveWith(spec, ALL_REDUCTIONS_ON);
          const model = await buildPlainModel(spec);
          run++;
          for (const cli of ['glpsol', 'cbc'] as const) {
            const answer = await solveLpText(model, cli, { dir, name: `spec-${run}-${cli}` });
            if (result.outcome === 'infeasible') {
              expect(answer.status, cli).toBe('infeasible');
              continue;
            }
            const value = expectSoundOptimum(spec, result);
            expect(answer.status, cli).toBe('optimal');
            expect(answer.violations, cli).toEqual([]);
            expect(sameOptimum(answer.recomputedObjective, answer.objective), `${cli} says ${answer.objective}, its point is worth ${answer.recomputedObjective}`).toBe(true);
            expect(sameOptimum(answer.objective, value), `${cli} ${answer.objective} vs engine ${value}`).toBe(true);
          }
        }),
        propertyRuns(25),
      );
    }, PROPERTY_TIMEOUT_MS);
  });
});
