import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { WindowStartState } from './plan-window';
import type { ScheduleBuffers } from './schedule-buffers';

export function initialState(spec: ResolvedSiteSpec): WindowStartState {
  return {
    units: spec.units.map((u) => ({ on: u.initial.on, stepsInState: u.initial.stepsInState })),
    socKwh: spec.storage.map((s) => s.initialSocKwh),
  };
}

/** Beyond the longer of its minimum up and down times, how long a unit has been in a state constrains nothing. */
export const memoryOf = (u: ResolvedSiteSpec['units'][number]) => Math.max(u.minUpSteps, u.minDownSteps);

/**
 * The state after steps `from … to − 1` of the stitched schedule, given the state before
 * `from`: each storage's SOC, each unit's on/off state and how long it has been in it. Only
 * those steps are read, so parallel segments can carry their state before earlier ones finish.
 */
export function advanceState(spec: ResolvedSiteSpec, before: WindowStartState, b: ScheduleBuffers, from: number, to: number): WindowStartState {
  if (to <= from) return before;
  return {
    units: spec.units.map((u, i) => {
      const on = b.units[i].on;
      const state = on[to - 1];
      let t = to - 1;
      while (t >= from && on[t] === state) t--;
      const run = to - 1 - t;
      const continued = t < from && (before.units[i].on ? 1 : 0) === state;
      return { on: state === 1, stepsInState: Math.min(memoryOf(u), continued ? before.units[i].stepsInState + run : run) };
    }),
    socKwh: spec.storage.map((_, i) => b.storage[i].soc[to - 1]),
  };
}

/**
 * Whether two states constrain what follows in the same way: the same on/off states with the
 * same time in state as far as minimum up/down times look back, and SOC equal within `socTolKwh`.
 */
export function sameState(spec: ResolvedSiteSpec, a: WindowStartState, b: WindowStartState, socTolKwh: (storage: number) => number): boolean {
  const unitsMatch = spec.units.every((u, i) => {
    const m = memoryOf(u);
    return a.units[i].on === b.units[i].on && Math.min(m, a.units[i].stepsInState) === Math.min(m, b.units[i].stepsInState);
  });
  return unitsMatch && spec.storage.every((_, i) => Math.abs(a.socKwh[i] - b.socKwh[i]) <= socTolKwh(i));
}
