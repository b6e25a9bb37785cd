import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { tinyAt } from './numerics';
import { stepTimestamps } from './step-timestamps';

/** The stitched schedule while windows are being solved: typed arrays over the whole horizon, in kW. */
export interface ScheduleBuffers {
  supplyUsed: Float64Array;
  unserved: Float64Array;
  imp: Float64Array;
  exp: Float64Array;
  units: { on: Uint8Array; power: Float64Array }[];
  storage: { charge: Float64Array; discharge: Float64Array; soc: Float64Array }[];
}

export function createScheduleBuffers(spec: ResolvedSiteSpec): ScheduleBuffers {
  const T = spec.horizon.steps;
  return {
    supplyUsed: new Float64Array(T),
    unserved: new Float64Array(T),
    imp: new Float64Array(T),
    exp: new Float64Array(T),
    units: spec.units.map(() => ({ on: new Uint8Array(T), power: new Float64Array(T) })),
    storage: spec.storage.map(() => ({ charge: new Float64Array(T), discharge: new Float64Array(T), soc: new Float64Array(T) })),
  };
}

export function toSchedule(spec: ResolvedSiteSpec, b: ScheduleBuffers): Schedule {
  const list = (a: ArrayLike<number>) => Array.from(a);
  const curtailed = spec.supply.availableKw.map((w, t) => cleanDifference(w, b.supplyUsed[t]));
  return {
    timestamps: stepTimestamps(spec.horizon.start, spec.horizon.stepMinutes, spec.horizon.steps),
    supplyUsedKw: list(b.supplyUsed),
    curtailedKw: curtailed,
    unservedKw: list(b.unserved),
    grid: { importKw: list(b.imp), exportKw: list(b.exp) },
    units: Object.fromEntries(spec.units.map((u, i) => [u.id, { on: list(b.units[i].on), powerKw: list(b.units[i].power) }])),
    storage: Object.fromEntries(
      spec.storage.map((s, i) => [
        s.id,
        { chargeKw: list(b.storage[i].charge), dischargeKw: list(b.storage[i].discharge), socKwh: list(b.storage[i].soc) },
      ]),
    ),
  };
}

/** w − used, with float noise shown as 0. */
function cleanDifference(w: number, used: number): number {
  const d = w - used;
  return Math.abs(d) <= tinyAt(w) ? 0 : d;
}
