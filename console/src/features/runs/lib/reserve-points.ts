import type { Schedule } from '@gridwright/shared/run-result';

/** An asset that holds spinning reserve: a unit or a battery whose schedule reports `reserveKw`. */
export interface ReserveProvider {
  id: string;
  kind: 'unit' | 'storage';
  key: string;
}

export interface ReservePoint {
  step: number;
  time: string;
  requiredKw: number;
  heldKw: number;
  shortfallKw: number;
  /** Per provider (its `key`): what it holds at this step. */
  [providerKey: string]: number | string;
}

export function reserveProviders(schedule: Schedule): ReserveProvider[] {
  return [
    ...Object.entries(schedule.units)
      .filter(([, u]) => u.reserveKw)
      .map(([id]) => ({ id, kind: 'unit' as const, key: `held:${id}` })),
    ...Object.entries(schedule.storage)
      .filter(([, s]) => s.reserveKw)
      .map(([id]) => ({ id, kind: 'storage' as const, key: `held:${id}` })),
  ];
}

/**
 * Reserve required, held and short per step, with each provider's share; null when the spec asks
 * for no reserve (the schedule's `reserve` is null then). The shares add up to `heldKw`.
 */
export function reservePoints(schedule: Schedule): ReservePoint[] | null {
  const reserve = schedule.reserve;
  if (!reserve) return null;
  const providers = reserveProviders(schedule);
  const series = (p: ReserveProvider) => (p.kind === 'unit' ? schedule.units[p.id].reserveKw : schedule.storage[p.id].reserveKw) ?? [];
  return schedule.timestamps.map((time, step) => {
    const row: ReservePoint = {
      step,
      time,
      requiredKw: reserve.requiredKw[step] ?? 0,
      heldKw: reserve.providedKw[step] ?? 0,
      shortfallKw: reserve.shortfallKw[step] ?? 0,
    };
    for (const p of providers) row[p.key] = series(p)[step] ?? 0;
    return row;
  });
}
