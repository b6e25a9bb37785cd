import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { reserveHeld } from './reserve-held';
import { tinyAt } from './numerics';
import { stepTimestamps } from './step-timestamps';

/** The stitched schedule while windows are being solved: typed arrays over the whole horizon, in kW (store units for stores). */
export interface ScheduleBuffers {
  supplyUsed: Float64Array;
  unserved: Float64Array;
  imp: Float64Array;
  exp: Float64Array;
  units: { on: Uint8Array; power: Float64Array }[];
  storage: { charge: Float64Array; discharge: Float64Array; soc: Float64Array }[];
  stores: { level: Float64Array; shortfall: Float64Array; spill: Float64Array }[];
  /** Marginal values per step (NaN where unknown): money per kWh, and per store unit. */
  energyValue: Float64Array;
  storeValue: Float64Array[];
  /** Per storage, what one more kWh in it after each step is worth (the dual of its SOC row; NaN where unknown): the horizon bound's link prices. */
  socValue: Float64Array[];
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
    stores: spec.stores.map(() => ({ level: new Float64Array(T), shortfall: new Float64Array(T), spill: new Float64Array(T) })),
    energyValue: new Float64Array(T).fill(NaN),
    storeValue: spec.stores.map(() => new Float64Array(T).fill(NaN)),
    socValue: spec.storage.map(() => new Float64Array(T).fill(NaN)),
  };
}

const list = (a: ArrayLike<number>) => Array.from(a);
const priced = (a: Float64Array) => Array.from(a, (v) => (Number.isFinite(v) ? v : null));

export function toSchedule(spec: ResolvedSiteSpec, b: ScheduleBuffers): Schedule {
  const curtailed = spec.supply.availableKw.map((w, t) => cleanDifference(w, b.supplyUsed[t]));
  const held = spec.reserve ? reserveHeld(spec, b) : null;
  return {
    timestamps: stepTimestamps(spec.horizon.start, spec.horizon.stepMinutes, spec.horizon.steps, spec.horizon.timeZone),
    supplyUsedKw: list(b.supplyUsed),
    curtailedKw: curtailed,
    unservedKw: list(b.unserved),
    grid: { importKw: list(b.imp), exportKw: list(b.exp) },
    units: Object.fromEntries(
      spec.units.map((u, i) => [
        u.id,
        { on: list(b.units[i].on), powerKw: list(b.units[i].power), ...(held?.units[i] ? { reserveKw: list(held.units[i]!) } : {}) },
      ]),
    ),
    storage: Object.fromEntries(
      spec.storage.map((s, i) => [
        s.id,
        {
          chargeKw: list(b.storage[i].charge),
          dischargeKw: list(b.storage[i].discharge),
          socKwh: list(b.storage[i].soc),
          ...(held?.storage[i] ? { reserveKw: list(held.storage[i]!) } : {}),
        },
      ]),
    ),
    stores: Object.fromEntries(
      spec.stores.map((s, j) => [s.id, { level: list(b.stores[j].level), shortfall: list(b.stores[j].shortfall), spill: list(b.stores[j].spill) }]),
    ),
    reserve: held && spec.reserve ? { requiredKw: spec.reserve.upKw.slice(), providedKw: list(held.total), shortfallKw: list(held.shortfall) } : null,
    marginalValues: {
      energyPerKwh: priced(b.energyValue),
      stores: Object.fromEntries(spec.stores.map((s, j) => [s.id, priced(b.storeValue[j])])),
    },
  };
}

/** w − used, with float noise shown as 0. */
function cleanDifference(w: number, used: number): number {
  const d = w - used;
  return Math.abs(d) <= tinyAt(w) ? 0 : d;
}
