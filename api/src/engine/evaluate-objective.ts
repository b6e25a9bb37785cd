import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ScheduleBuffers } from './schedule-buffers';
import { countStarts } from './count-starts';

/** SPEC.md §2's objective, evaluated on a (stitched) schedule in the spec's own units. */
export function evaluateObjective(spec: ResolvedSiteSpec, b: ScheduleBuffers): number {
  const dh = spec.horizon.stepMinutes / 60;
  const T = spec.horizon.steps;
  const penalty = spec.siteLoad.unservedPenaltyPerKwh ?? 0;
  let energyValue = 0;
  for (let t = 0; t < T; t++) {
    energyValue += spec.grid.exportPrice[t] * b.exp[t] - spec.grid.importPrice[t] * b.imp[t] - penalty * b.unserved[t];
  }
  let startCosts = 0;
  spec.units.forEach((u, i) => {
    const rate = u.kind === 'flexible-load' ? u.valuePerKwh : -u.costPerKwh;
    const power = b.units[i].power;
    for (let t = 0; t < T; t++) energyValue += rate * power[t];
    startCosts += u.startupCost * countStarts(u, b.units[i].on);
  });
  spec.storage.forEach((s, i) => {
    const d = b.storage[i].discharge;
    for (let t = 0; t < T; t++) energyValue -= s.cycleCostPerKwh * d[t];
  });
  return dh * energyValue - startCosts;
}
