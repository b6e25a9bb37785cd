import type { ResolvedUnit } from '@gridwright/shared/site-spec';

/**
 * Starts of a unit: steps where it is on and was off the step before (step −1 is its initial
 * state). A start is cold after more than `coldAfterSteps` steps off, counting the steps off
 * before the horizon (`initial.stepsInState` of an initially off unit).
 */
export function countStarts(unit: ResolvedUnit, on: ArrayLike<number>): { starts: number; cold: number } {
  const { hot, cold, coldAfterSteps } = unit.startupCost;
  const twoLevel = coldAfterSteps !== null && cold !== hot;
  let starts = 0;
  let colds = 0;
  let prev = unit.initial.on ? 1 : 0;
  let offFor = unit.initial.on ? 0 : unit.initial.stepsInState;
  for (let t = 0; t < on.length; t++) {
    if (on[t] && !prev) {
      starts++;
      if (twoLevel && offFor > coldAfterSteps) colds++;
    }
    offFor = on[t] ? 0 : offFor + 1;
    prev = on[t];
  }
  return { starts, cold: colds };
}

/** What a unit's starts cost: hot ones at `hot`, cold ones at `cold`. */
export function startCost(unit: ResolvedUnit, counted: { starts: number; cold: number }): number {
  return (counted.starts - counted.cold) * unit.startupCost.hot + counted.cold * unit.startupCost.cold;
}
