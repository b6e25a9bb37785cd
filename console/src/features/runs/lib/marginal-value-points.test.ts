import type { Schedule } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { anyPriceKnown, marginalValuePoints, storeValueKey } from './marginal-value-points';

describe('marginalValuePoints', () => {
  it('pairs the value of energy with the value of each store product per step, keeping unknown prices null', () => {
    const schedule = {
      timestamps: ['2027-10-05T00:00:00+01:00', '2027-10-05T01:00:00+01:00'],
      marginalValues: { energyPerKwh: [0.068, null], stores: { 'h2-tank': [4.42, 4.42] } },
    } as unknown as Schedule;
    expect(marginalValuePoints(schedule)).toEqual([
      { step: 0, time: schedule.timestamps[0], energy: 0.068, [storeValueKey('h2-tank')]: 4.42 },
      { step: 1, time: schedule.timestamps[1], energy: null, [storeValueKey('h2-tank')]: 4.42 },
    ]);
  });

  it('tells a series with no price at any step from one with gaps', () => {
    const schedule = {
      timestamps: ['2027-10-05T00:00:00+01:00', '2027-10-05T01:00:00+01:00'],
      marginalValues: { energyPerKwh: [null, null], stores: { 'h2-tank': [null, 0] } },
    } as unknown as Schedule;
    const points = marginalValuePoints(schedule);
    expect(anyPriceKnown(points, 'energy')).toBe(false);
    expect(anyPriceKnown(points, storeValueKey('h2-tank'))).toBe(true);
  });
});
