// The engine on generated valid specs: solveSite never throws (an infeasible or timed-out spec is
// an outcome, not an exception), and a schedule, when there is one, covers every step.
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { resolveDefaults, validateSiteSpec } from '../../shared/src/site-spec';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { fuzzRuns, fuzzSeed } from './support/fuzz-runs';
import { validSpecArb } from './support/spec-arbitraries';

const OUTCOMES = ['optimal', 'feasible', 'infeasible', 'no-solution'];

describe('solveSite under fuzzing', () => {
  const solver = new HighsSolverPool();
  afterAll(async () => solver.close());

  it('never throws on a valid small spec and returns a well-formed result', async () => {
    await fc.assert(
      fc.asyncProperty(validSpecArb(8), async (spec) => {
        const checked = validateSiteSpec(spec);
        if (!checked.ok) throw new Error(`generator produced an invalid spec: ${JSON.stringify(checked.errors)}`);
        const resolved = resolveDefaults(checked.spec);
        const result = await solveSite(resolved, { solver });
        expect(OUTCOMES).toContain(result.outcome);
        if (result.outcome === 'optimal' || result.outcome === 'feasible') {
          expect(result.schedule).toBeTruthy();
          expect(result.schedule!.timestamps).toHaveLength(resolved.horizon.steps);
          expect(Number.isFinite(result.objective.value)).toBe(true);
          for (const u of resolved.units) expect(result.schedule!.units[u.id].on).toHaveLength(resolved.horizon.steps);
        }
      }),
      { numRuns: fuzzRuns(40), seed: fuzzSeed(7101) },
    );
  });
});
