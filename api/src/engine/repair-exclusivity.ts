import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { TINY, tinyAt } from './numerics';
import type { ScheduleBuffers } from './schedule-buffers';

export interface UnrepairedSteps {
  /** Steps (global) where storage i still charges and discharges at once. */
  storage: number[][];
  /** Steps where the grid still imports and exports at once. */
  grid: number[];
}

const tiny = (v: number) => v <= TINY;

/**
 * Where `relaxExclusivity` dropped a binary and the solver still did both at once (it may, when
 * doing so costs nothing), rewrite the step so it does not: net import against export, and
 * reduce charge and discharge together while keeping SOC, absorbing the round-trip loss by
 * importing less, curtailing supply, or exporting more. None of these lowers the objective at
 * the steps where the plan dropped the binary. Steps that cannot be rewritten are returned so
 * the window is solved again with their binaries.
 */
export function repairExclusivity(spec: ResolvedSiteSpec, b: ScheduleBuffers, from: number, to: number): UnrepairedSteps {
  const left: UnrepairedSteps = { storage: spec.storage.map(() => []), grid: [] };
  for (let t = from; t < to; t++) {
    if (!tiny(b.imp[t]) && !tiny(b.exp[t])) {
      const m = Math.min(b.imp[t], b.exp[t]);
      b.imp[t] -= m;
      b.exp[t] -= m;
      if (tiny(b.imp[t])) b.imp[t] = 0;
      if (tiny(b.exp[t])) b.exp[t] = 0;
    }
    spec.storage.forEach((s, i) => {
      const st = b.storage[i];
      if (tiny(st.charge[t]) || tiny(st.discharge[t])) return;
      const roundTrip = s.chargeEfficiency * s.dischargeEfficiency;
      const a = Math.min(st.charge[t], st.discharge[t] / roundTrip);
      const surplus = a * (1 - roundTrip);
      const fromImport = Math.min(surplus, b.imp[t]);
      const fromSupply = Math.min(surplus - fromImport, b.supplyUsed[t]);
      const fromExport = spec.grid.exportPrice[t] >= 0 ? Math.min(surplus - fromImport - fromSupply, spec.grid.exportLimitKw - b.exp[t]) : 0;
      if (surplus - fromImport - fromSupply - fromExport > tinyAt(surplus)) {
        left.storage[i].push(t);
        return;
      }
      b.imp[t] -= fromImport;
      b.supplyUsed[t] -= fromSupply;
      b.exp[t] += Math.max(0, fromExport);
      st.charge[t] -= a;
      st.discharge[t] -= a * roundTrip;
      if (tiny(st.charge[t])) st.charge[t] = 0;
      if (tiny(st.discharge[t])) st.discharge[t] = 0;
    });
    if (!tiny(b.imp[t]) && !tiny(b.exp[t])) left.grid.push(t);
  }
  return left;
}
