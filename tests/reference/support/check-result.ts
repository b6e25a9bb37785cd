/** Assertions every engine result in the reference checks must satisfy. */
import { expect } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSolution } from '../../../api/src/engine/solve-site';
import { verifySchedule } from '../../../api/src/engine/verify-schedule';
import { closeRel } from './specs';

/**
 * An optimal, verified solution: its schedule passes the verifier, its objective is the
 * verifier's. The engine leaves the run's status to the worker, so the solution has none.
 */
export function expectVerifiedOptimum(spec: ResolvedSiteSpec, result: SiteSolution): number {
  expect(result).not.toHaveProperty('status');
  expect(result.outcome).toBe('optimal');
  expect(result.schedule).not.toBeNull();
  const check = verifySchedule(spec, result.schedule!);
  expect(check.violations).toEqual([]);
  const value = result.objective.value ?? Number.NaN;
  expect(closeRel(check.objective, value), `verifier ${check.objective} vs reported ${value}`).toBe(true);
  return value;
}

/** Each step of a series within the reference README's 1e-6 relative tolerance of a derived figure (null never is). */
export function expectSeries(label: string, xs: readonly (number | null)[], want: readonly number[]) {
  expect(xs.length, label).toBe(want.length);
  xs.forEach((x, t) => expect(x !== null && closeRel(x, want[t]), `${label} step ${t}: ${x} vs ${want[t]}`).toBe(true));
}

/** The result's objective terms (kpis.objectiveTerms) named in `want`, each within 1e-6 relative. */
export function expectObjectiveTerms(result: SiteSolution, want: Partial<NonNullable<SiteSolution['kpis']>['objectiveTerms']>) {
  for (const [term, value] of Object.entries(want)) {
    const got = result.kpis!.objectiveTerms[term as keyof typeof want];
    expect(closeRel(got, value), `objective term ${term}: ${got} vs ${value}`).toBe(true);
  }
}

/**
 * Steps where a battery charges and discharges, or the grid imports and exports, at once.
 * Anything above 1e-9 of the larger limit counts: the engine promises cleaned values.
 */
export function simultaneousUse(spec: ResolvedSiteSpec, schedule: Schedule): string[] {
  const found: string[] = [];
  const gridEps = 1e-9 * Math.max(1, spec.grid.importLimitKw, spec.grid.exportLimitKw);
  schedule.grid.importKw.forEach((imp, t) => {
    if (imp > gridEps && schedule.grid.exportKw[t] > gridEps) found.push(`grid step ${t}: import ${imp}, export ${schedule.grid.exportKw[t]}`);
  });
  for (const st of spec.storage) {
    const s = schedule.storage[st.id];
    const eps = 1e-9 * Math.max(1, st.maxChargeKw, st.maxDischargeKw);
    s.chargeKw.forEach((c, t) => {
      if (c > eps && s.dischargeKw[t] > eps) found.push(`${st.id} step ${t}: charge ${c}, discharge ${s.dischargeKw[t]}`);
    });
  }
  return found;
}

/**
 * Same optimum up to the MIP gap of both solves (1e-9 in these specs) plus solver round-off:
 * 1e-6 relative to max(1, |a|, |b|).
 */
export function sameOptimum(a: number, b: number): boolean {
  return closeRel(a, b, 1e-6);
}

/** fast-check settings: a fixed seed in CI (override with FC_SEED to explore), small runs. */
export function propertyRuns(numRuns: number): { numRuns: number; seed: number } {
  return { numRuns: Number(process.env.FC_RUNS ?? numRuns), seed: Number(process.env.FC_SEED ?? 20270601) };
}

/** A generous per-test limit for the property runs: dozens of solves on a busy 2-core machine. */
export const PROPERTY_TIMEOUT_MS = 240_000;
