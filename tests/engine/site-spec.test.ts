import { describe, expect, it } from 'vitest';
import { resolveDefaults, siteSpecSchema, validateSiteSpec } from '@gridwright/shared/site-spec';

const minimal = () => ({
  horizon: { start: '2027-03-01T00:00:00+01:00', stepMinutes: 60, steps: 3 },
  supply: { availableKw: [0, 5, 10] },
});

const errorsOf = (input: unknown, limits?: { maxSteps?: number; maxUnits?: number }) => {
  const r = validateSiteSpec(input, limits);
  return r.ok ? [] : r.errors;
};

// Every rule below is a limit or default written in SPEC.md §1.
describe('site spec v1 validation', () => {
  it('accepts a minimal spec and fills every default of SPEC.md §1', () => {
    const r = validateSiteSpec({
      ...minimal(),
      units: [{ id: 'g', kind: 'generator', ratingKw: 10 }],
      storage: [{ id: 'b', capacityKwh: 10, maxChargeKw: 5, maxDischargeKw: 5, initialSocKwh: 2 }],
    });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const s = resolveDefaults(r.spec);
    // A generator without a cost is one slice at 0 per kWh up to its rating (SPEC §5 curves).
    expect(s.units[0]).toMatchObject({ minStableKw: 0, curve: [{ upToKw: 10, perKwh: 0 }], minUpSteps: 1, minDownSteps: 1 });
    expect(s.units[0].startupCost).toEqual({ hot: 0, cold: 0, coldAfterSteps: null });
    expect(s.units[0].initial).toEqual({ on: false, stepsInState: 1, powerKw: null });
    expect(s.storage[0]).toMatchObject({ minSocKwh: 0, chargeEfficiency: 1, dischargeEfficiency: 1, cycleCostPerKwh: 0, finalSocKwh: null });
    expect(s.grid).toEqual({ island: true, importLimitKw: 0, exportLimitKw: 0, importPrice: [0, 0, 0], exportPrice: [0, 0, 0], demandCharges: [] });
    expect(s.siteLoad).toEqual({ kw: [0, 0, 0], unservedPenaltyPerKwh: null });
    // Default windows are the steps in 36 h and 24 h; a month of them per parallel segment; the
    // lookahead relaxed.
    expect(s.solver.window).toEqual({ windowSteps: 36, commitSteps: 24, segmentWindows: 32, lookahead: 'relaxed' });
    expect(s.solver.reductions).toEqual({ sparseSets: true, tightBigM: true, scaling: true, relaxExclusivity: true, independentBlocks: true });
  });

  it('expands a scalar price to one per step', () => {
    const r = validateSiteSpec({ ...minimal(), grid: { importLimitKw: 5, importPrice: 0.2, exportPrice: [0.1, 0.2, 0.3] } });
    expect(r.ok && resolveDefaults(r.spec).grid.importPrice).toEqual([0.2, 0.2, 0.2]);
  });

  it('names each invalid field with an RFC 6901 pointer', () => {
    const errors = errorsOf({
      horizon: { start: '2027-03-01T00:00:00', stepMinutes: 7, steps: 0 },
      supply: { availableKw: [1, -1] },
      units: [{ id: 'a/b', kind: 'generator', ratingKw: 1 }],
    });
    const pointers = errors.map((e) => e.pointer);
    expect(pointers).toEqual(expect.arrayContaining(['/horizon/start', '/horizon/stepMinutes', '/horizon/steps', '/supply/availableKw/1', '/units/0/id']));
  });

  it('checks the cross-field rules', () => {
    const errors = errorsOf({
      ...minimal(),
      supply: { availableKw: [1, 2] },
      siteLoad: { kw: [1, 2, 3, 4] },
      grid: { exportPrice: [0.1] },
      units: [
        { id: 'x', kind: 'generator', ratingKw: 5, minStableKw: 6 },
        { id: 'y', kind: 'flexible-load', ratingKw: 5 },
      ],
      storage: [
        { id: 'y', capacityKwh: 10, maxChargeKw: 1, maxDischargeKw: 1, minSocKwh: 3, initialSocKwh: 2, finalSocKwh: 11 },
      ],
      solver: { window: { windowSteps: 4, commitSteps: 5 } },
    });
    const byPointer = Object.fromEntries(errors.map((e) => [e.pointer, e.message]));
    expect(byPointer['/supply/availableKw']).toMatch(/2 values; horizon.steps is 3/);
    expect(byPointer['/siteLoad/kw']).toMatch(/4 values/);
    expect(byPointer['/grid/exportPrice']).toMatch(/1 values/);
    expect(byPointer['/units/0/minStableKw']).toMatch(/exceeds ratingKw/);
    expect(byPointer['/storage/0/id']).toMatch(/unique across units, storage and stores/);
    expect(byPointer['/storage/0/initialSocKwh']).toMatch(/within/);
    expect(byPointer['/storage/0/finalSocKwh']).toMatch(/within/);
    expect(byPointer['/solver/window/commitSteps']).toMatch(/exceeds windowSteps/);
  });

  it('names a one-window segment and an unknown lookahead', () => {
    const errors = errorsOf({ ...minimal(), solver: { window: { segmentWindows: 1, lookahead: 'partial' } } });
    const byPointer = Object.fromEntries(errors.map((e) => [e.pointer, e.message]));
    expect(byPointer['/solver/window/segmentWindows']).toMatch(/0 \(one sequence\) or at least 2/);
    expect(byPointer['/solver/window/lookahead']).toBeDefined();
  });

  it('rejects efficiencies outside (0, 1], non-finite numbers and unknown fields', () => {
    const errors = errorsOf({
      ...minimal(),
      storage: [{ id: 'b', capacityKwh: 10, maxChargeKw: 1, maxDischargeKw: 1, initialSocKwh: 1, chargeEfficiency: 0, dischargeEfficiency: 1.2 }],
      grid: { importLimitKw: Infinity },
      extra: true,
    });
    const pointers = errors.map((e) => e.pointer);
    expect(pointers).toEqual(expect.arrayContaining(['/storage/0/chargeEfficiency', '/storage/0/dischargeEfficiency', '/grid/importLimitKw', '']));
  });

  it('refuses magnitudes no double-precision solver can hold next to ordinary figures', () => {
    const errors = errorsOf({
      ...minimal(),
      supply: { availableKw: [1e300, 1, 1e-250] },
      units: [{ id: 'u', kind: 'generator', ratingKw: 1e12, costPerKwh: 1e-20 }],
    });
    expect(errors.map((e) => e.pointer)).toEqual(
      expect.arrayContaining(['/supply/availableKw/0', '/supply/availableKw/2', '/units/0/ratingKw', '/units/0/costPerKwh']),
    );
  });

  it('applies a plan’s lower caps on steps and units', () => {
    const errors = errorsOf({ ...minimal(), units: [{ id: 'a', kind: 'generator', ratingKw: 1 }, { id: 'b', kind: 'generator', ratingKw: 1 }] }, { maxSteps: 2, maxUnits: 1 });
    expect(errors.map((e) => e.pointer)).toEqual(['/horizon/steps', '/units']);
  });

  it('accepts a series reference and needs its values to resolve', () => {
    const r = validateSiteSpec({ ...minimal(), supply: { seriesId: 'ser_1' } });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(() => resolveDefaults(r.spec)).toThrow(/seriesId/);
    expect(resolveDefaults(r.spec, [1, 2, 3]).supply.availableKw).toEqual([1, 2, 3]);
  });

  it('enforces the 35 136-step ceiling in the schema itself', () => {
    const steps = 35_137;
    const r = siteSpecSchema.safeParse({ horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 15, steps }, supply: { availableKw: [0] } });
    expect(r.success).toBe(false);
  });
});
