import { stateMemorySteps, type ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { WindowStartState } from './plan-window';
import type { ScheduleBuffers } from './schedule-buffers';

export function initialState(spec: ResolvedSiteSpec): WindowStartState {
  return {
    units: spec.units.map((u) => ({ on: u.initial.on, stepsInState: u.initial.stepsInState, powerKw: u.initial.on ? u.initial.powerKw : null })),
    socKwh: spec.storage.map((s) => s.initialSocKwh),
    storeLevels: spec.stores.map((s) => s.initial),
    peaksKw: spec.grid.demandCharges.map((c) => c.existingPeakKw),
  };
}

/** Beyond this many steps, how long a unit has been in a state constrains nothing (minimum up/down times, cold starts). */
export const memoryOf = (u: ResolvedSiteSpec['units'][number]) => stateMemorySteps(u);

/**
 * The state after steps `from … to − 1` of the stitched schedule, given the state before
 * `from`: each storage's SOC and store's level, each unit's on/off state, how long it has been in
 * it and its last output, and the highest import so far in each demand charge's window (the steps
 * `chargeSteps` marks). Only
 * those steps are read, so parallel segments can carry their state before earlier ones finish.
 */
export function advanceState(
  spec: ResolvedSiteSpec,
  chargeSteps: Uint8Array[],
  before: WindowStartState,
  b: ScheduleBuffers,
  from: number,
  to: number,
): WindowStartState {
  if (to <= from) return before;
  return {
    units: spec.units.map((u, i) => {
      const on = b.units[i].on;
      const state = on[to - 1];
      let t = to - 1;
      while (t >= from && on[t] === state) t--;
      const run = to - 1 - t;
      const continued = t < from && (before.units[i].on ? 1 : 0) === state;
      return {
        on: state === 1,
        stepsInState: Math.min(memoryOf(u), continued ? before.units[i].stepsInState + run : run),
        powerKw: state === 1 ? b.units[i].power[to - 1] : null,
      };
    }),
    socKwh: spec.storage.map((_, i) => b.storage[i].soc[to - 1]),
    storeLevels: spec.stores.map((_, j) => b.stores[j].level[to - 1]),
    peaksKw: spec.grid.demandCharges.map((_, c) => {
      let peak = before.peaksKw[c];
      for (let t = from; t < to; t++) if (chargeSteps[c][t] && b.imp[t] > peak) peak = b.imp[t];
      return peak;
    }),
  };
}

/**
 * Whether two states constrain what follows in the same way: the same on/off states with the
 * same time in state as far as any rule looks back, the same output for a unit whose ramps reach
 * back to it, SOC and store levels equal within `tolerance` (of each one's capacity), and the
 * same demand-charge peaks.
 */
export function sameState(spec: ResolvedSiteSpec, a: WindowStartState, b: WindowStartState, relTol: number): boolean {
  const near = (x: number, y: number, scale: number) => Math.abs(x - y) <= relTol * Math.max(1, scale);
  const unitsMatch = spec.units.every((u, i) => {
    const m = memoryOf(u);
    const ua = a.units[i];
    const ub = b.units[i];
    if (ua.on !== ub.on || Math.min(m, ua.stepsInState) !== Math.min(m, ub.stepsInState)) return false;
    const ramped = u.rampUpKwPerMin !== null || u.rampDownKwPerMin !== null;
    return !ramped || !ua.on || near(ua.powerKw ?? 0, ub.powerKw ?? 0, u.ratingKw);
  });
  return (
    unitsMatch &&
    spec.storage.every((s, i) => near(a.socKwh[i], b.socKwh[i], s.capacityKwh)) &&
    spec.stores.every((s, j) => near(a.storeLevels[j], b.storeLevels[j], s.capacity)) &&
    spec.grid.demandCharges.every((_, c) => near(a.peaksKw[c], b.peaksKw[c], spec.grid.importLimitKw))
  );
}
