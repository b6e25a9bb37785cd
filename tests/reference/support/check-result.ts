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

/**
 * The reductions the property checks hold the engine to on a spec: the given ones, except that
 * relaxExclusivity stays off where a battery holds spinning reserve. There, charging and
 * discharging in one step can pay in the relaxed model — it burns stored energy without using
 * up the discharge headroom the reserve counts — so dropping the binary changes the optimum, and
 * the repair that nets the two afterwards lowers the reserve held (under a hard requirement the
 * schedule then fails verification). Example: a full 40 kWh battery (10 kW each way, 0.8 each
 * way) that must hold 10 kW of reserve at step 0 and 15 kW at step 1 can only do so at step 1 by
 * charging 5 kW, so it must lose 4 kWh at step 0; discharged (3.2 kW) they leave only 6.8 kW of
 * reserve at step 0, while charging and discharging 8.9 kW at once burns them and leaves 10. This
 * carve-out goes once the engine keeps those binaries.
 */
export function reductionsHeldTo(
  spec: ResolvedSiteSpec,
  reductions: ResolvedSiteSpec['solver']['reductions'],
): ResolvedSiteSpec['solver']['reductions'] {
  const batteryHoldsReserve = spec.reserve !== null && spec.storage.some((s) => s.providesReserve);
  return batteryHoldsReserve ? { ...reductions, relaxExclusivity: false } : reductions;
}
