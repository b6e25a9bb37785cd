/** Small helpers shared by the reference checks: resolving specs and switching reductions. */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { MAX_TIME_LIMIT_SECONDS, resolveDefaults, validateSiteSpec, type ResolvedSiteSpec } from '@gridwright/shared/site-spec';

/**
 * The read-only reference cases sit in `shared/` next to the project root, here and in CI
 * (the CI copy of shared/ is placed beside the clone). Resolved from this file, not the cwd.
 */
export const REFERENCE_DIR = path.resolve(import.meta.dirname, '../../../../shared/reference-cases');
export const referenceCasesPresent = existsSync(REFERENCE_DIR);

export function resolveSpec(input: unknown): ResolvedSiteSpec {
  const v = validateSiteSpec(input);
  if (!v.ok) throw new Error(`invalid spec: ${JSON.stringify(v.errors)}`);
  return resolveDefaults(v.spec);
}

export function readReferenceCase(file: string): ResolvedSiteSpec {
  return resolveSpec(JSON.parse(readFileSync(path.join(REFERENCE_DIR, file), 'utf8')));
}

export const ALL_REDUCTIONS_ON = { sparseSets: true, tightBigM: true, scaling: true, relaxExclusivity: true, independentBlocks: true };
export const ALL_REDUCTIONS_OFF = { sparseSets: false, tightBigM: false, scaling: false, relaxExclusivity: false, independentBlocks: false };

/** A copy solved in one window with the given reductions and an exact gap. */
export function monolithic(spec: ResolvedSiteSpec, reductions: ResolvedSiteSpec['solver']['reductions'], mipGap = 1e-9): ResolvedSiteSpec {
  // The longest time limit: a check waits for the proof, so a busy machine cannot turn an optimum
  // into a time-limit result.
  const solver = { ...spec.solver, mode: 'monolithic' as const, mipGap, timeLimitSeconds: MAX_TIME_LIMIT_SECONDS, reductions: { ...reductions } };
  return { ...spec, solver };
}

/** |a − b| ≤ rel · max(1, |a|, |b|): the comparison the reference README prescribes (1e-6). */
export function closeRel(a: number, b: number, rel = 1e-6): boolean {
  return Math.abs(a - b) <= rel * Math.max(1, Math.abs(a), Math.abs(b));
}
