import type { Schedule } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { bucketRows, coefficientBars, reserveKey, shortTime, supplyPoints, unitPowerPoints, unitStrips } from './chart-data';

// A hand-made 4-step schedule; every expected value below is worked out by hand from it.
const schedule: Schedule = {
  timestamps: ['2027-03-01T00:00:00+01:00', '2027-03-01T01:00:00+01:00', '2027-03-01T02:00:00+01:00', '2027-03-01T03:00:00+01:00'],
  supplyUsedKw: [0, 10, 20, 5],
  curtailedKw: [0, 0, 5, 15],
  unservedKw: [0, 0, 0, 0],
  grid: { importKw: [8, 0, 0, 0], exportKw: [0, 0, 4, 0] },
  units: { 'ely-1': { on: [0, 1, 1, 0], powerKw: [0, 10, 16, 0] }, 'gen-1': { on: [1, 1, 1, 1], powerKw: [8, 8, 8, 8], reserveKw: [2, 2, 0, 2] } },
  storage: { 'bess-1': { chargeKw: [0, 0, 0, 0], dischargeKw: [0, 0, 0, 5], socKwh: [50, 50, 50, 44.7] } },
  stores: {},
  reserve: null,
  marginalValues: { energyPerKwh: [null, null, null, null], stores: {} },
};

describe('supplyPoints', () => {
  it('reconstructs the available supply as used plus curtailed', () => {
    expect(supplyPoints(schedule).map((p) => [p.availableKw, p.usedKw, p.curtailedKw])).toEqual([
      [0, 0, 0],
      [10, 10, 0],
      [25, 20, 5],
      [20, 5, 15],
    ]);
  });
});

describe('unitStrips', () => {
  it('compresses on/off into runs of equal state', () => {
    const [ely, gen] = unitStrips(schedule);
    expect(ely).toEqual({
      id: 'ely-1',
      onSteps: 2,
      segments: [
        { from: 0, to: 0, on: false },
        { from: 1, to: 2, on: true },
        { from: 3, to: 3, on: false },
      ],
    });
    expect(gen.segments).toEqual([{ from: 0, to: 3, on: true }]);
  });
});

describe('unitPowerPoints', () => {
  it('puts every unit in one row per step', () => {
    expect(unitPowerPoints(schedule)[2]).toMatchObject({ step: 2, 'ely-1': 16, 'gen-1': 8 });
  });

  it('adds the reserve a unit holds only for the units the schedule reports it for (SPEC §5: providers only)', () => {
    const row = unitPowerPoints(schedule)[1];
    expect(row[reserveKey('gen-1')]).toBe(2);
    expect(reserveKey('ely-1') in row).toBe(false);
  });
});

describe('bucketRows', () => {
  it('leaves short series alone', () => {
    const rows = supplyPoints(schedule);
    expect(bucketRows(rows, 10)).toBe(rows);
  });

  it('averages fixed buckets and keeps each bucket’s first step and time', () => {
    const rows = supplyPoints(schedule);
    const out = bucketRows(rows, 2);
    expect(out).toHaveLength(2);
    expect(out[0]).toEqual({ step: 0, time: schedule.timestamps[0], availableKw: 5, usedKw: 5, curtailedKw: 0 });
    expect(out[1]).toEqual({ step: 2, time: schedule.timestamps[2], availableKw: 22.5, usedKw: 12.5, curtailedKw: 10 });
  });

  it('averages only the known values of a series with gaps, and keeps a bucket of gaps a gap', () => {
    const rows = [
      { step: 0, time: 'a', price: null, peak: 5 },
      { step: 1, time: 'b', price: 0.3, peak: null },
      { step: 2, time: 'c', price: null, peak: null },
      { step: 3, time: 'd', price: null, peak: null },
    ];
    // Buckets {0, 1} and {2, 3}: price (0.3) / 1 known, then none; peak 5 / 1 known, then none.
    expect(bucketRows(rows, 2)).toEqual([
      { step: 0, time: 'a', price: 0.3, peak: 5 },
      { step: 2, time: 'c', price: null, peak: null },
    ]);
  });
});

describe('coefficientBars', () => {
  it('spans log10 of each range and flags ranges outside the healthy band', () => {
    const bars = coefficientBars({ matrix: [0.5, 500], objective: [1e-5, 20], bounds: null, rhs: [0, 40] });
    expect(bars.map((b) => b.name)).toEqual(['matrix', 'objective', 'rhs']);
    const [matrix, objective, rhs] = bars;
    expect(matrix.span).toEqual([-0.301, 2.699]);
    expect(matrix.orders).toBe(3);
    expect(matrix.healthy).toBe(true);
    expect(objective.healthy).toBe(false);
    // An rhs whose smallest value is 0 starts at its largest non-zero value: a single point at log10(40).
    expect(rhs.min).toBe(40);
    expect(rhs.orders).toBe(0);
  });
});

describe('shortTime', () => {
  it('keeps the wall-clock time written in the timestamp', () => {
    expect(shortTime('2027-03-01T23:30:00+01:00')).toBe('01 Mar 23:30');
  });
});
