import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { initialState } from './carry-state';
import { monolithicWindow } from './horizon-windows';
import { planWindow, siteFacts } from './plan-window';

/**
 * `auto` switches to rolling windows above this many unit-steps plus storage- and store-steps (the
 * on/off binaries and level chains that make one model slow; units weighted by unitWeight) once the
 * horizon spans more than two windows. Measured here (2 cores, shared with other work, tests/engine/synthetic-sites.ts),
 * monolithic vs rolling wall time:
 *   grid-tied site, 1 unit + battery, hourly:  7 d (336)   0.5 s vs 0.5 s; 14 d (672)  1.6 s vs 2.3 s;
 *                                              30 d (1440) 13.5 s vs 2.6 s (rolling 0.1 % below the optimum)
 *   same site at 15 min, 3 d (576)             2.3 s vs 0.8 s
 *   solar-only, 3 units, 15 min, 7 d (2016)    2.6 s vs 3.7 s
 * Below the threshold the optimum is usually cheap enough to prove; above it monolithic
 * times grow much faster than the rolling windows' linear cost.
 */
export const AUTO_ROLLING_ABOVE = 1_200;

/**
 * The most unit-steps in one independent block of the monolithic model, or null when the model
 * cannot split: storage carries energy across every step. Elsewhere steps where sparse sets
 * leave every unit off by construction, for at least the longest minimum down time, separate
 * blocks (independent-blocks.ts finds them exactly; this counts them without building the model).
 */
function largestBlockUnitSteps(spec: ResolvedSiteSpec): number | null {
  const { sparseSets, independentBlocks } = spec.solver.reductions;
  // Storage, stores and a demand-charge peak link every step of the horizon.
  const linked = spec.storage.length > 0 || spec.stores.length > 0 || spec.grid.demandCharges.length > 0;
  if (!sparseSets || !independentBlocks || linked || spec.units.length === 0) return null;
  const plan = planWindow(spec, siteFacts(spec), monolithicWindow(spec)[0], initialState(spec));
  const T = spec.horizon.steps;
  const split = Math.max(...spec.units.map((u) => u.minDownSteps));
  let largest = 0;
  let blockStart = 0;
  let quietRun = 0;
  for (let t = 0; t <= T; t++) {
    const quiet = t < T && plan.units.every((u) => !u.hasBinary[t]);
    if (quiet) {
      quietRun++;
      continue;
    }
    if (quietRun >= split || t === T) {
      largest = Math.max(largest, t - quietRun - blockStart);
      blockStart = t;
    }
    quietRun = 0;
  }
  return largest * spec.units.length;
}

/**
 * How much harder a unit's steps are than a plain on/off unit's: a cold-start look-back, ramps
 * linking its steps and reserve headroom each add branching the solver must do. Measured on the
 * island demo site (three gensets with all of them): 48 hourly steps solve whole in 5–9 s, 144 steps
 * did not finish in 300 s, while rolling windows solved them in 11 s within 1 % of that incumbent.
 */
function unitWeight(spec: ResolvedSiteSpec, u: ResolvedSiteSpec['units'][number]): number {
  const { hot, cold, coldAfterSteps } = u.startupCost;
  let weight = 1;
  if (coldAfterSteps !== null && cold > hot) weight += 1;
  if (u.rampUpKwPerMin !== null || u.rampDownKwPerMin !== null) weight += 0.5;
  if (spec.reserve && u.providesReserve) weight += 0.5;
  return weight;
}

export function chooseSolveMode(spec: ResolvedSiteSpec): 'monolithic' | 'rolling' {
  const { mode, window } = spec.solver;
  if (mode !== 'auto') return mode;
  const T = spec.horizon.steps;
  if (T <= 2 * window.windowSteps) return 'monolithic';
  const perStep = spec.units.reduce((sum, u) => sum + unitWeight(spec, u), 0) + spec.storage.length + spec.stores.length;
  const size = T * perStep;
  if (size <= AUTO_ROLLING_ABOVE) return 'monolithic';
  // A horizon that falls apart into small independent blocks is solved whole, and exactly.
  const block = largestBlockUnitSteps(spec);
  return block !== null && block <= AUTO_ROLLING_ABOVE ? 'monolithic' : 'rolling';
}
