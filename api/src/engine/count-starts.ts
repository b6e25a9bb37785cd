import type { ResolvedUnit } from '@gridwright/shared/site-spec';

/** Starts of a unit: steps where it is on and was off the step before (step −1 is its initial state). */
export function countStarts(unit: ResolvedUnit, on: ArrayLike<number>): number {
  let starts = 0;
  let prev = unit.initial.on ? 1 : 0;
  for (let t = 0; t < on.length; t++) {
    if (on[t] && !prev) starts++;
    prev = on[t];
  }
  return starts;
}
