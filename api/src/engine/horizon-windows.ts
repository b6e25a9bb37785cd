import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { HorizonWindow } from './plan-window';

/**
 * The windows of a rolling-horizon solve: each starts where the previous one's committed part
 * ended; the first window that reaches the horizon's end commits everything it covers.
 */
export function rollingWindows(spec: ResolvedSiteSpec): HorizonWindow[] {
  const T = spec.horizon.steps;
  const { windowSteps, commitSteps } = spec.solver.window;
  const windows: HorizonWindow[] = [];
  for (let from = 0; from < T; ) {
    const steps = Math.min(windowSteps, T - from);
    const isFinal = from + steps >= T;
    const commit = isFinal ? steps : commitSteps;
    windows.push({ from, steps, commit, isFinal });
    from += commit;
  }
  return windows;
}

export function monolithicWindow(spec: ResolvedSiteSpec): HorizonWindow[] {
  const T = spec.horizon.steps;
  return [{ from: 0, steps: T, commit: T, isFinal: true }];
}
