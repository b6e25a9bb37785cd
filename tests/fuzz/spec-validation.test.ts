// The shared validator (used by the API and the console) on generated input: valid specs pass,
// hostile ones are refused with RFC 6901 pointers, and nothing makes it throw.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { validateSiteSpec } from '../../shared/src/site-spec';
import { fuzzRuns, fuzzSeed } from './support/fuzz-runs';
import { isJsonPointer } from './support/problem-assertions';
import { mutatedSpecArb, validSpecArb } from './support/spec-arbitraries';

describe('validateSiteSpec under fuzzing', () => {
  it('accepts every generated valid spec (the generator keeps to SPEC.md §1)', () => {
    fc.assert(
      fc.property(validSpecArb(), (spec) => {
        const v = validateSiteSpec(spec);
        expect(v.ok, JSON.stringify(v.ok ? null : v.errors)).toBe(true);
      }),
      { numRuns: fuzzRuns(300), seed: fuzzSeed(7001) },
    );
  });

  it('never throws on mutated specs and names every problem with a JSON pointer', () => {
    fc.assert(
      fc.property(mutatedSpecArb(), (body) => {
        const v = validateSiteSpec(body);
        if (!v.ok) {
          expect(v.errors.length).toBeGreaterThan(0);
          for (const e of v.errors) {
            expect(isJsonPointer(e.pointer), e.pointer).toBe(true);
            expect(e.message.length).toBeGreaterThan(0);
          }
        }
      }),
      { numRuns: fuzzRuns(400), seed: fuzzSeed(7002) },
    );
  });

  it('refuses a non-finite number wherever one appears (SPEC.md §1: every number finite)', () => {
    fc.assert(
      fc.property(validSpecArb(), fc.constantFrom(Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY), (spec, bad) => {
        const steps = spec.horizon.steps;
        const load = { kw: Array.from({ length: steps }, (_v, i) => (i === steps - 1 ? bad : 1)) };
        const v = validateSiteSpec({ ...spec, siteLoad: load });
        expect(v.ok).toBe(false);
        if (!v.ok) expect(v.errors.map((e) => e.pointer)).toContain(`/siteLoad/kw/${steps - 1}`);
      }),
      { numRuns: fuzzRuns(100), seed: fuzzSeed(7003) },
    );
  });
});
