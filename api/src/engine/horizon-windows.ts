import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { HorizonWindow } from './plan-window';

/**
 * The windows of a rolling-horizon solve of steps `from … to − 1`: each starts where the
 * previous one's committed part ended; the first window that reaches `to` commits everything
 * it covers. `endsHorizon` says whether `to` is the horizon's end (the final SOC target applies).
 */
export function windowsBetween(spec: ResolvedSiteSpec, from: number, to: number, endsHorizon: boolean): HorizonWindow[] {
  const { windowSteps, commitSteps } = spec.solver.window;
  const windows: HorizonWindow[] = [];
  for (let start = from; start < to; ) {
    const steps = Math.min(windowSteps, to - start);
    const last = start + steps >= to;
    const commit = last ? steps : commitSteps;
    windows.push({ from: start, steps, commit, isFinal: last && endsHorizon });
    start += commit;
  }
  return windows;
}

export function rollingWindows(spec: ResolvedSiteSpec): HorizonWindow[] {
  return windowsBetween(spec, 0, spec.horizon.steps, true);
}

export function monolithicWindow(spec: ResolvedSiteSpec): HorizonWindow[] {
  const T = spec.horizon.steps;
  return [{ from: 0, steps: T, commit: T, isFinal: true }];
}

/** A run of consecutive rolling windows solved as one sequence; segments are solved side by side. */
export interface RollingSegment {
  from: number;
  to: number;
  windows: HorizonWindow[];
}

/**
 * The rolling horizon cut into segments of about `segmentWindows` windows each (none when the
 * horizon has fewer than twice that many). A segment's last window ends where the next segment
 * starts; the state there is fixed in advance (solve-rolling.ts), so the segments need not
 * wait for each other. The cut depends on the spec alone, so a spec gets the same schedule on
 * any machine, however many solver threads it has. A horizon with demand charges is never cut.
 */
export function rollingSegments(spec: ResolvedSiteSpec): RollingSegment[] {
  const T = spec.horizon.steps;
  const windows = rollingWindows(spec);
  const per = spec.solver.window.segmentWindows;
  // A demand charge is paid on the highest import of the whole horizon: a segment cannot know
  // the peak its predecessors reach, so such a horizon is solved as one sequence.
  if (per === 0 || windows.length < 2 * per || spec.grid.demandCharges.length > 0) return [{ from: 0, to: T, windows }];
  const count = Math.floor(windows.length / per);
  const cuts = Array.from({ length: count - 1 }, (_, k) => windows[(k + 1) * per].from);
  const bounds = [0, ...cuts, T];
  return bounds.slice(0, -1).map((from, k) => {
    const to = bounds[k + 1];
    return { from, to, windows: windowsBetween(spec, from, to, to === T) };
  });
}
