import type { Schedule } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { chargeLines, existingPeakKey, gridPoints, inChargeWindow, localClock, peakKey, windowSpans } from './demand-charge-windows';

describe('localClock', () => {
  it('reads the wall clock written in the timestamp, with the ISO weekday of its local date', () => {
    // 2027-11-09 is a Tuesday (ISO 2); 2027-03-28 a Sunday (ISO 7).
    expect(localClock('2027-11-09T08:30:00+01:00')).toEqual({ weekday: 2, minuteOfDay: 510 });
    expect(localClock('2027-03-28T23:45:00+02:00')).toEqual({ weekday: 7, minuteOfDay: 1425 });
  });

  it('keeps the local date where UTC has moved on to the next day', () => {
    // 23:00 at −03:00 is 02:00 UTC on Wednesday; the step is still Tuesday's.
    expect(localClock('2027-08-03T23:00:00-03:00')).toEqual({ weekday: 2, minuteOfDay: 1380 });
  });
});

// Each case is SPEC §5's window rule read directly: from inclusive, to exclusive, "00:00"–"24:00" the whole day,
// from after to wraps past midnight, from equal to to is empty, the weekday is the step's own local date.
describe('inChargeWindow', () => {
  const at = (weekday: number, hhmm: string) => ({ weekday, minuteOfDay: Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3)) });
  const weekdays = { daysOfWeek: [1, 2, 3, 4, 5], from: '08:00', to: '20:00' };

  it('takes from inclusive and to exclusive', () => {
    expect(inChargeWindow(weekdays, at(2, '08:00'))).toBe(true);
    expect(inChargeWindow(weekdays, at(2, '19:30'))).toBe(true);
    expect(inChargeWindow(weekdays, at(2, '20:00'))).toBe(false);
    expect(inChargeWindow(weekdays, at(2, '07:59'))).toBe(false);
  });

  it('covers only the listed weekdays', () => {
    expect(inChargeWindow(weekdays, at(6, '12:00'))).toBe(false);
  });

  it('reads an absent window, or absent parts, as every step of every day', () => {
    expect(inChargeWindow(undefined, at(7, '00:00'))).toBe(true);
    expect(inChargeWindow({ from: '00:00', to: '24:00' }, at(3, '23:45'))).toBe(true);
    expect(inChargeWindow({ daysOfWeek: [3] }, at(3, '23:45'))).toBe(true);
  });

  it('wraps past midnight when from is after to, with the weekday of the step itself', () => {
    const nights = { daysOfWeek: [1], from: '22:00', to: '06:00' };
    expect(inChargeWindow(nights, at(1, '23:00'))).toBe(true);
    expect(inChargeWindow(nights, at(1, '05:30'))).toBe(true);
    // Tuesday 01:00 follows Monday night, but its own date is a Tuesday, which the window does not list.
    expect(inChargeWindow(nights, at(2, '01:00'))).toBe(false);
    expect(inChargeWindow(nights, at(1, '12:00'))).toBe(false);
  });

  it('is empty when from equals to', () => {
    expect(inChargeWindow({ from: '10:00', to: '10:00' }, at(1, '10:00'))).toBe(false);
  });
});

// Four half-hour steps on Tuesday 9 November 2027 from 07:00, local time; the window opens at 08:00.
const schedule = {
  timestamps: ['2027-11-09T07:00:00+01:00', '2027-11-09T07:30:00+01:00', '2027-11-09T08:00:00+01:00', '2027-11-09T08:30:00+01:00'],
  grid: { importKw: [250, 340, 320, 280], exportKw: [0, 0, 4, 0] },
} as unknown as Schedule;
const charge = { id: 'day-peak', pricePerKw: 10, window: { daysOfWeek: [1, 2, 3, 4, 5], from: '08:00', to: '20:00' }, existingPeakKw: 300 };

describe('chargeLines and gridPoints', () => {
  const [line] = chargeLines(schedule, [charge], { 'day-peak': { peakKw: 320, cost: 200 } });

  it('marks the steps the window covers and takes the billed peak from the KPIs', () => {
    // The 340 kW at 07:30 is outside the window, so the billed peak is the 320 kW at 08:00: 10 × (320 − 300) = 200.
    expect(line).toEqual({ id: 'day-peak', peakKw: 320, existingPeakKw: 300, cost: 200, inWindow: [false, false, true, true] });
  });

  it('draws export below the axis, never as -0, and each peak only over its window', () => {
    const points = gridPoints(schedule, [line]);
    expect(points.map((p) => p.exportKw)).toEqual([0, 0, -4, 0]);
    expect(Object.is(points[0].exportKw, -0)).toBe(false);
    expect(points.map((p) => p[peakKey('day-peak')])).toEqual([null, null, 320, 320]);
    expect(points.map((p) => p[existingPeakKey('day-peak')])).toEqual([null, null, 300, 300]);
  });

  it('shades each run of covered rows up to the row where a step line leaves it', () => {
    const points = gridPoints(schedule, [line]);
    expect(windowSpans(points, 'day-peak')).toEqual([[schedule.timestamps[2], schedule.timestamps[3]]]);
    const gap = gridPoints(schedule, [{ ...line, inWindow: [true, false, true, false] }]);
    expect(windowSpans(gap, 'day-peak')).toEqual([
      [schedule.timestamps[0], schedule.timestamps[1]],
      [schedule.timestamps[2], schedule.timestamps[3]],
    ]);
  });

  it('falls back to the existing peak when the result has no KPI for the charge', () => {
    expect(chargeLines(schedule, [charge], undefined)[0]).toMatchObject({ peakKw: 300, cost: 0 });
  });
});
