import type { Schedule } from '@gridwright/shared/run-result';
import type { SiteSpec } from '@gridwright/shared/site-spec';

/** One step of a level (a battery's SOC in kWh, a store's level in its own unit) beside the limits it must keep. */
export interface LevelPoint {
  step: number;
  time: string;
  level: number;
  min: number;
  capacity: number;
  /** The final target, at the last step only: null elsewhere, so it is drawn as one marker. */
  final: number | null;
  /** Per hour, in the level's unit per hour (stores only; 0 for a battery). */
  shortfall: number;
  spill: number;
}

export interface LevelLimits {
  min?: number;
  capacity: number;
  final?: number;
}

function levelPoints(timestamps: string[], level: number[], limits: LevelLimits, flows?: { shortfall: number[]; spill: number[] }): LevelPoint[] {
  const last = timestamps.length - 1;
  return timestamps.map((time, step) => ({
    step,
    time,
    level: level[step] ?? 0,
    min: limits.min ?? 0,
    capacity: limits.capacity,
    final: step === last && limits.final !== undefined ? limits.final : null,
    shortfall: flows?.shortfall[step] ?? 0,
    spill: flows?.spill[step] ?? 0,
  }));
}

type StorageSpec = NonNullable<SiteSpec['storage']>[number];
type StoreSpec = NonNullable<SiteSpec['stores']>[number];

/** A battery's state of charge with its limits (SPEC §1: minSocKwh defaults to 0; finalSocKwh is optional). */
export function socPoints(schedule: Schedule, storage: Pick<StorageSpec, 'id' | 'minSocKwh' | 'capacityKwh' | 'finalSocKwh'>): LevelPoint[] {
  const soc = schedule.storage[storage.id]?.socKwh ?? [];
  return levelPoints(schedule.timestamps, soc, { min: storage.minSocKwh, capacity: storage.capacityKwh, final: storage.finalSocKwh });
}

/** A store's level, shortfall and spill, all in the store's own unit (SPEC §5). */
export function storePoints(schedule: Schedule, store: Pick<StoreSpec, 'id' | 'min' | 'capacity' | 'final'>): LevelPoint[] {
  const s = schedule.stores[store.id];
  return levelPoints(schedule.timestamps, s?.level ?? [], { min: store.min, capacity: store.capacity, final: store.final }, s && { shortfall: s.shortfall, spill: s.spill });
}

/** What a store's figures are counted in: its declared unit, or plain "units" when the spec names none. */
export function storeUnit(store: Pick<StoreSpec, 'unit'> | undefined): string {
  return store?.unit ?? 'units';
}
