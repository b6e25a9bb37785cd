import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Kpis, ObjectiveTerms } from '@gridwright/shared/run-result';
import { countStarts } from './count-starts';
import { demandChargePeaks } from './demand-charge-peaks';
import { reserveHeld } from './reserve-held';
import type { ScheduleBuffers } from './schedule-buffers';

function sum(values: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i];
  return s;
}

export function scheduleKpis(spec: ResolvedSiteSpec, chargeSteps: Uint8Array[], b: ScheduleBuffers, objectiveTerms: ObjectiveTerms): Kpis {
  const dh = spec.horizon.stepMinutes / 60;
  const T = spec.horizon.steps;
  const supplied = sum(b.supplyUsed) * dh;
  const peaks = demandChargePeaks(spec, chargeSteps, b.imp);
  return {
    suppliedKwh: supplied,
    curtailedKwh: Math.max(0, sum(spec.supply.availableKw) * dh - supplied),
    importKwh: sum(b.imp) * dh,
    exportKwh: sum(b.exp) * dh,
    unservedKwh: sum(b.unserved) * dh,
    reserveShortfallKwh: spec.reserve ? sum(reserveHeld(spec, b).shortfall) * dh : 0,
    units: Object.fromEntries(
      spec.units.map((u, i) => {
        const counted = countStarts(u, b.units[i].on);
        return [u.id, { energyKwh: sum(b.units[i].power) * dh, starts: counted.starts, coldStarts: counted.cold, onSteps: sum(b.units[i].on) }];
      }),
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
    stores: Object.fromEntries(
      spec.stores.map((s, j) => {
        let produced = 0;
        let consumed = 0;
        spec.units.forEach((u, i) => {
          const energy = sum(b.units[i].power) * dh;
          if (u.produces?.store === j) produced += u.produces.perKwh * energy;
          if (u.consumes?.store === j) consumed += u.consumes.perKwh * energy;
        });
        const shortfall = sum(b.stores[j].shortfall) * dh;
        return [
          s.id,
          {
            produced,
            consumed,
            inflow: sum(s.inflowPerHour) * dh,
            delivered: sum(s.demandPerHour) * dh - shortfall,
            shortfall,
            spilled: sum(b.stores[j].spill) * dh,
            finalLevel: T > 0 ? b.stores[j].level[T - 1] : s.initial,
          },
        ];
      }),
    ),
    demandCharges: Object.fromEntries(
      spec.grid.demandCharges.map((c, i) => [c.id, { peakKw: peaks[i], cost: c.pricePerKw * (peaks[i] - c.existingPeakKw) }]),
    ),
    objectiveTerms,
  };
}
