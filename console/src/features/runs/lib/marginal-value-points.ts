import type { Schedule } from '@gridwright/shared/run-result';

export const storeValueKey = (id: string) => `store:${id}`;

export interface MarginalValuePoint {
  step: number;
  time: string;
  /** Money per kWh delivered to the site at this step; null where no price is known. */
  energy: number | null;
  /** Per store (`storeValueKey`): money per unit of its product. */
  [storeKey: string]: number | string | null;
}

export function marginalValuePoints(schedule: Schedule): MarginalValuePoint[] {
  const { energyPerKwh, stores } = schedule.marginalValues;
  const storeIds = Object.keys(stores);
  return schedule.timestamps.map((time, step) => {
    const row: MarginalValuePoint = { step, time, energy: energyPerKwh[step] ?? null };
    for (const id of storeIds) row[storeValueKey(id)] = stores[id][step] ?? null;
    return row;
  });
}

/** Whether any step of the series under `key` has a price: none has one when the pricing solve ran out of time. */
export function anyPriceKnown(points: MarginalValuePoint[], key: string): boolean {
  return points.some((p) => typeof p[key] === 'number');
}
