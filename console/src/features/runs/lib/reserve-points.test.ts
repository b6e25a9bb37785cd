import type { Schedule } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { reservePoints, reserveProviders } from './reserve-points';

// Two steps: gen-a and the battery hold reserve, the ice maker does not provide any (no reserveKw).
const schedule = {
  timestamps: ['2027-08-03T00:00:00-03:00', '2027-08-03T01:00:00-03:00'],
  units: { 'gen-a': { on: [1, 1], powerKw: [200, 240], reserveKw: [50, 10] }, 'ice-maker': { on: [1, 0], powerKw: [40, 0] } },
  storage: { bess: { chargeKw: [0, 0], dischargeKw: [0, 0], socKwh: [100, 100], reserveKw: [20, 25] } },
  reserve: { requiredKw: [60, 50], providedKw: [70, 35], shortfallKw: [0, 15] },
} as unknown as Schedule;

describe('reservePoints', () => {
  it('lists the units, then the batteries, that report reserve held', () => {
    expect(reserveProviders(schedule).map((p) => `${p.kind}:${p.id}`)).toEqual(['unit:gen-a', 'storage:bess']);
  });

  it("pairs required, held and short with each provider's share, the shares adding up to what is held", () => {
    const [first, second] = reservePoints(schedule)!;
    expect(first).toMatchObject({ requiredKw: 60, heldKw: 70, shortfallKw: 0, 'held:gen-a': 50, 'held:bess': 20 });
    // Step 1: 10 + 25 = 35 held, 15 short of the 50 required (SPEC §5: held + shortfall ≥ required).
    expect(second).toMatchObject({ requiredKw: 50, heldKw: 35, shortfallKw: 15, 'held:gen-a': 10, 'held:bess': 25 });
    expect(second['held:gen-a'] as number + (second['held:bess'] as number)).toBe(second.heldKw);
  });

  it('is null when the spec asks for no reserve', () => {
    expect(reservePoints({ ...schedule, reserve: null })).toBeNull();
  });
});
