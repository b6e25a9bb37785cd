import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { WindowStartState } from './plan-window';
import type { ScheduleBuffers } from './schedule-buffers';

export function initialState(spec: ResolvedSiteSpec): WindowStartState {
  return {
    units: spec.units.map((u) => ({ on: u.initial.on, stepsInState: u.initial.stepsInState })),
    socKwh: spec.storage.map((s) => s.initialSocKwh),
  };
}

/**
 * The state after step `lastStep` of the stitched schedule: each storage's SOC, each unit's
 * on/off state and how long it has been in it (reaching back into the spec's initial state),
 * so minimum up/down times hold across window seams.
 */
export function stateAfter(spec: ResolvedSiteSpec, b: ScheduleBuffers, lastStep: number): WindowStartState {
  return {
    units: spec.units.map((u, i) => {
      const on = b.units[i].on;
      const state = on[lastStep];
      // Beyond the longer minimum, time in state no longer constrains anything.
      const enough = Math.max(u.minUpSteps, u.minDownSteps);
      let t = lastStep;
      while (t >= 0 && on[t] === state && lastStep - t < enough) t--;
      let steps = lastStep - t;
      if (t < 0 && (u.initial.on ? 1 : 0) === state) steps += u.initial.stepsInState;
      return { on: state === 1, stepsInState: steps };
    }),
    socKwh: spec.storage.map((_, i) => b.storage[i].soc[lastStep]),
  };
}
