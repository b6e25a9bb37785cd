import type { Schedule } from '@gridwright/shared/run-result';
import { MIN_POWER, type ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { demandChargePeaks } from '../engine/demand-charge-peaks';
import { demandChargeSteps } from '../engine/demand-charge-steps';

/** A unit's state at a step boundary, in the terms of the spec's `initial`. */
export interface UnitState {
  on: boolean;
  stepsInState: number;
  /** Output of a unit that is on; null when off, or when no output is known (no ramp limit then). */
  powerKw: number | null;
}

/** Every state a re-plan starts from, by asset id, as the plan has it at one step boundary. */
export interface SiteState {
  storage: Map<string, number>;
  stores: Map<string, number>;
  units: Map<string, UnitState>;
  demandPeaks: Map<string, number>;
}

/**
 * A planned figure made fit to start a spec from: held to its limits (the schedule is exact only
 * to the solver's tolerance) and 0 below the smallest power a spec may hold.
 */
function startingValue(value: number, lowest: number, highest: number): number {
  const held = Math.min(highest, Math.max(lowest, value));
  return held < MIN_POWER ? 0 : held;
}

/** How long a unit has been in the state it has at the end of step `from − 1`, counting its history before step 0. */
function stepsInStateAt(on: number[], from: number, before: { on: boolean; stepsInState: number }): number {
  const state = on[from - 1];
  let k = 0;
  while (k < from && on[from - 1 - k] === state) k++;
  return k === from && before.on === (state === 1) ? k + before.stepsInState : k;
}

/**
 * The state the plan leaves at the start of step `from`: each battery's state of charge and each
 * store's level at the end of step `from − 1`, each unit's on/off, time in that state and output
 * then, and each demand charge's peak so far (its `existingPeakKw` and the planned import in its
 * window before `from`). At step 0 that is the spec's own initial state.
 */
export function plannedStateAt(spec: ResolvedSiteSpec, schedule: Schedule, from: number): SiteState {
  const last = from - 1;
  const peaks = demandChargePeaks(spec, demandChargeSteps(spec), schedule.grid.importKw.slice(0, from));
  return {
    storage: new Map(
      spec.storage.map((s) => [s.id, from === 0 ? s.initialSocKwh : startingValue(schedule.storage[s.id].socKwh[last], s.minSocKwh, s.capacityKwh)]),
    ),
    stores: new Map(spec.stores.map((s) => [s.id, from === 0 ? s.initial : startingValue(schedule.stores[s.id].level[last], s.min, s.capacity)])),
    units: new Map(
      spec.units.map((u) => {
        if (from === 0) return [u.id, { ...u.initial }];
        const planned = schedule.units[u.id];
        const on = planned.on[last] === 1;
        return [
          u.id,
          {
            on,
            stepsInState: stepsInStateAt(planned.on, from, u.initial),
            powerKw: on ? startingValue(planned.powerKw[last], u.minStableKw, u.ratingKw) : null,
          },
        ];
      }),
    ),
    demandPeaks: new Map(spec.grid.demandCharges.map((c, i) => [c.id, peaks[i]])),
  };
}
