import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';

/**
 * `auto` switches to rolling windows above this many unit-steps plus storage-steps (the on/off
 * binaries and SOC chains that make one model slow) once the horizon spans more than two
 * windows. Measured here (2 cores, shared with other work, tests/engine/synthetic-sites.ts),
 * monolithic vs rolling wall time:
 *   grid-tied site, 1 unit + battery, hourly:  7 d (336)   0.5 s vs 0.5 s; 14 d (672)  1.6 s vs 2.3 s;
 *                                              30 d (1440) 13.5 s vs 2.6 s (rolling 0.1 % below the optimum)
 *   same site at 15 min, 3 d (576)             2.3 s vs 0.8 s
 *   solar-only, 3 units, 15 min, 7 d (2016)    2.6 s vs 3.7 s
 * Below the threshold the optimum is usually cheap enough to prove; above it monolithic
 * times grow much faster than the rolling windows' linear cost.
 */
export const AUTO_ROLLING_ABOVE = 1_200;

export function chooseSolveMode(spec: ResolvedSiteSpec): 'monolithic' | 'rolling' {
  const { mode, window } = spec.solver;
  if (mode !== 'auto') return mode;
  const T = spec.horizon.steps;
  if (T <= 2 * window.windowSteps) return 'monolithic';
  const size = T * (spec.units.length + spec.storage.length);
  return size > AUTO_ROLLING_ABOVE ? 'rolling' : 'monolithic';
}
