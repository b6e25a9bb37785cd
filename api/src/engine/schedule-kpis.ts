import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Kpis } from '@gridwright/shared/run-result';
import type { ScheduleBuffers } from './schedule-buffers';
import { countStarts } from './count-starts';

function sum(values: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i];
  return s;
}

export function scheduleKpis(spec: ResolvedSiteSpec, b: ScheduleBuffers): Kpis {
  const dh = spec.horizon.stepMinutes / 60;
  const T = spec.horizon.steps;
  const supplied = sum(b.supplyUsed) * dh;
  return {
    suppliedKwh: supplied,
    curtailedKwh: Math.max(0, sum(spec.supply.availableKw) * dh - supplied),
    importKwh: sum(b.imp) * dh,
    exportKwh: sum(b.exp) * dh,
    unservedKwh: sum(b.unserved) * dh,
    units: Object.fromEntries(
      spec.units.map((u, i) => [
        u.id,
        { energyKwh: sum(b.units[i].power) * dh, starts: countStarts(u, b.units[i].on), onSteps: sum(b.units[i].on) },
      ]),
    ),
    storage: Object.fromEntries(
      spec.storage.map((s, i) => [
        s.id,
        {
          chargedKwh: sum(b.storage[i].charge) * dh,
          dischargedKwh: sum(b.storage[i].discharge) * dh,
          finalSocKwh: T > 0 ? b.storage[i].soc[T - 1] : s.initialSocKwh,
        },
      ]),
    ),
  };
}
