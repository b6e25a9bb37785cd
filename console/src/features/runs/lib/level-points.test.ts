import type { Schedule } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { socPoints, storePoints, storeUnit } from './level-points';

// A hand-made 3-step schedule with one battery and one store; the expected values are read off it.
const schedule = {
  timestamps: ['2027-06-14T00:00:00+02:00', '2027-06-14T00:30:00+02:00', '2027-06-14T01:00:00+02:00'],
  storage: { bess: { chargeKw: [0, 0, 0], dischargeKw: [0, 5, 0], socKwh: [50, 44.7, 44.7] } },
  stores: { reservoir: { level: [690, 680.5, 700], shortfall: [0, 2, 0], spill: [0, 0, 1.5] } },
} as unknown as Schedule;

describe('socPoints', () => {
  it('pairs each step with the storage limits and puts the final target at the last step only', () => {
    const points = socPoints(schedule, { id: 'bess', minSocKwh: 10, capacityKwh: 100, finalSocKwh: 40 });
    expect(points[1]).toEqual({ step: 1, time: schedule.timestamps[1], level: 44.7, min: 10, capacity: 100, final: null, shortfall: 0, spill: 0 });
    expect(points.map((p) => p.final)).toEqual([null, null, 40]);
  });

  it('defaults the lower limit to zero and draws no target without finalSocKwh (SPEC.md §1 defaults)', () => {
    const points = socPoints(schedule, { id: 'bess', capacityKwh: 100 });
    expect(points[0].min).toBe(0);
    expect(points.every((p) => p.final === null)).toBe(true);
  });
});

describe('storePoints', () => {
  it("keeps the store's level, shortfall and spill as the schedule has them, in the store's own unit", () => {
    const points = storePoints(schedule, { id: 'reservoir', min: 200, capacity: 1400, final: 700 });
    expect(points.map((p) => [p.level, p.shortfall, p.spill, p.final])).toEqual([
      [690, 0, 0, null],
      [680.5, 2, 0, null],
      [700, 0, 1.5, 700],
    ]);
    expect(points[0]).toMatchObject({ min: 200, capacity: 1400 });
  });

  it('names the unit of a store, or plain units when the spec gives none', () => {
    expect(storeUnit({ unit: 'm3' })).toBe('m3');
    expect(storeUnit({})).toBe('units');
  });
});
