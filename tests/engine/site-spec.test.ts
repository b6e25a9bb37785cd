import { describe, expect, it } from 'vitest';
import { resolveDefaults, resolvedSiteSpecSchema, siteSpecSchema, validateSiteSpec } from '@gridwright/shared/site-spec';

const minimal = () => ({
  horizon: { start: '2027-03-01T00:00:00+01:00', stepMinutes: 60, steps: 3 },
  supply: { availableKw: [0, 5, 10] },
});

const errorsOf = (input: unknown) => {
  const r = validateSiteSpec(input);
  return r.ok ? [] : r.errors;
};

const resolved = (input: unknown, availableKw?: number[]) => {
  const r = validateSiteSpec(input);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return resolveDefaults(r.spec, availableKw);
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
    expect(pointers).toEqual(expect.arrayContaining(['/storage/0/chargeEfficiency', '/storage/0/dischargeEfficiency', '/grid/importLimitKw', '/extra']));
  });

  it('names each unknown field by its own pointer, escaped per RFC 6901', () => {
    const errors = errorsOf({ ...minimal(), 'a/b~c': 1, units: [{ id: 'u', kind: 'generator', ratingKw: 1, colour: 'red' }] });
    expect(errors.map((e) => e.pointer).sort()).toEqual(['/a~1b~0c', '/units/0/colour']);
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

// The defaults of SPEC.md §1 and the figures below are the resolution the engine has always been
// given; each expectation is derived by hand beside it.
describe('site spec resolution', () => {
  it('resolves a minimal spec to the complete engine input', () => {
    expect(resolved(minimal())).toEqual({
      name: null,
      horizon: { start: '2027-03-01T00:00:00+01:00', stepMinutes: 60, steps: 3, timeZone: null },
      supply: { availableKw: [0, 5, 10] },
      siteLoad: { kw: [0, 0, 0], unservedPenaltyPerKwh: null },
      grid: { island: true, importLimitKw: 0, exportLimitKw: 0, importPrice: [0, 0, 0], exportPrice: [0, 0, 0], demandCharges: [] },
      units: [],
      storage: [],
      stores: [],
      reserve: null,
      solver: {
        mode: 'auto',
        // 36 h and 24 h of 60-minute steps.
        window: { windowSteps: 36, commitSteps: 24, segmentWindows: 32, lookahead: 'relaxed' },
        // max(60, ceil(3 / 60)) = 60 s.
        timeLimitSeconds: 60,
        mipGap: 1e-4,
        reductions: { sparseSets: true, tightBigM: true, scaling: true, relaxExclusivity: true, independentBlocks: true },
      },
    });
  });

  it('keeps what the spec says over every default', () => {
    const spec = resolved({
      name: 'yard',
      ...minimal(),
      siteLoad: { kw: [1, 2, 3], unservedPenaltyPerKwh: 4 },
      grid: { importLimitKw: 9, exportLimitKw: 8, importPrice: [1, 2, 3], exportPrice: 0.5 },
      units: [{ id: 'g', kind: 'generator', ratingKw: 10, minStableKw: 2, costPerKwh: 0.3, startupCost: 5, minUpSteps: 2, minDownSteps: 3, initial: { on: true, stepsInState: 7 } }],
      storage: [{ id: 'b', capacityKwh: 10, maxChargeKw: 5, maxDischargeKw: 4, chargeEfficiency: 0.9, dischargeEfficiency: 0.8, minSocKwh: 1, initialSocKwh: 2, finalSocKwh: 3, cycleCostPerKwh: 0.01 }],
      solver: { mode: 'rolling', window: { windowSteps: 2, commitSteps: 1, segmentWindows: 0, lookahead: 'integer' }, timeLimitSeconds: 5, mipGap: 0.01, reductions: { scaling: false } },
    });
    expect(spec.name).toBe('yard');
    expect(spec.siteLoad).toEqual({ kw: [1, 2, 3], unservedPenaltyPerKwh: 4 });
    expect(spec.grid).toEqual({ island: false, importLimitKw: 9, exportLimitKw: 8, importPrice: [1, 2, 3], exportPrice: [0.5, 0.5, 0.5], demandCharges: [] });
    // costPerKwh becomes one slice up to the rating; a single start cost is hot = cold (SPEC §5).
    expect(spec.units[0]).toEqual({
      id: 'g', kind: 'generator', ratingKw: 10, minStableKw: 2, curve: [{ upToKw: 10, perKwh: 0.3 }], noLoadCostPerHour: 0,
      startupCost: { hot: 5, cold: 5, coldAfterSteps: null }, minUpSteps: 2, minDownSteps: 3, rampUpKwPerMin: null, rampDownKwPerMin: null,
      initial: { on: true, stepsInState: 7, powerKw: null }, providesReserve: true, produces: null, consumes: null,
    });
    expect(spec.storage[0]).toEqual({
      id: 'b', capacityKwh: 10, maxChargeKw: 5, maxDischargeKw: 4, chargeEfficiency: 0.9, dischargeEfficiency: 0.8, minSocKwh: 1, initialSocKwh: 2,
      finalSocKwh: 3, cycleCostPerKwh: 0.01, chargeFromSupplyOnly: false, providesReserve: true,
    });
    expect(spec.solver).toEqual({
      mode: 'rolling',
      window: { windowSteps: 2, commitSteps: 1, segmentWindows: 0, lookahead: 'integer' },
      timeLimitSeconds: 5,
      mipGap: 0.01,
      reductions: { sparseSets: true, tightBigM: true, scaling: false, relaxExclusivity: true, independentBlocks: true },
    });
  });

  it('gives a grid without prices zero prices, and is not an island', () => {
    expect(resolved({ ...minimal(), grid: {} }).grid).toEqual({
      island: false, importLimitKw: 0, exportLimitKw: 0, importPrice: [0, 0, 0], exportPrice: [0, 0, 0], demandCharges: [],
    });
  });

  it('sets a unit’s time in its initial state to its longest minimum when the spec leaves it out', () => {
    const spec = resolved({
      ...minimal(),
      units: [
        { id: 'a', kind: 'generator', ratingKw: 1 },
        { id: 'b', kind: 'generator', ratingKw: 1, minUpSteps: 3, minDownSteps: 5 },
        { id: 'c', kind: 'flexible-load', ratingKw: 1, minUpSteps: 4, minDownSteps: 2, initial: { on: true } },
        { id: 'd', kind: 'flexible-load', ratingKw: 1, minUpSteps: 4, initial: { on: false, stepsInState: 0 } },
      ],
    });
    // Absent: off for max(minUpSteps, minDownSteps) steps — max(1, 1) = 1 and max(3, 5) = 5; given on: max(4, 2) = 4.
    expect(spec.units.map((u) => u.initial)).toEqual([
      { on: false, stepsInState: 1, powerKw: null },
      { on: false, stepsInState: 5, powerKw: null },
      { on: true, stepsInState: 4, powerKw: null },
      { on: false, stepsInState: 0, powerKw: null },
    ]);
  });

  it('derives the rolling windows from the step length', () => {
    const windowAt = (stepMinutes: number, window?: object) =>
      resolved({ horizon: { start: '2027-03-01T00:00:00Z', stepMinutes, steps: 1 }, supply: { availableKw: [0] }, solver: { window } }).solver.window;
    // 36 h and 24 h: 15-minute steps 144 and 96, 5-minute steps 432 and 288, 30-minute steps 72 and 48.
    expect(windowAt(15)).toMatchObject({ windowSteps: 144, commitSteps: 96 });
    expect(windowAt(5)).toMatchObject({ windowSteps: 432, commitSteps: 288 });
    expect(windowAt(30)).toMatchObject({ windowSteps: 72, commitSteps: 48 });
    // A window shorter than a day keeps all of itself; a given commit stands.
    expect(windowAt(60, { windowSteps: 10 })).toMatchObject({ windowSteps: 10, commitSteps: 10 });
    expect(windowAt(60, { commitSteps: 30 })).toMatchObject({ windowSteps: 36, commitSteps: 30 });
  });

  it('grows the default time limit with the horizon: 60 s, one second per 60 steps beyond 3 600 steps', () => {
    const limitFor = (steps: number) =>
      resolved({ horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 15, steps }, supply: { availableKw: new Array(steps).fill(0) } }).solver.timeLimitSeconds;
    expect(limitFor(96)).toBe(60);
    expect(limitFor(3_600)).toBe(60);
    // ceil(3 601 / 60) = 61; a 15-minute year: ceil(35 040 / 60) = 584; the ceiling: ceil(35 136 / 60) = 586.
    expect(limitFor(3_601)).toBe(61);
    expect(limitFor(35_040)).toBe(584);
    expect(limitFor(35_136)).toBe(586);
  });

  it('copies the arrays it is given, so the engine cannot change the spec or the series it came from', () => {
    const input = { ...minimal(), grid: { importPrice: [1, 2, 3] } };
    const series = [7, 8, 9];
    const spec = resolved({ ...input, supply: { seriesId: 'ser_1' } }, series);
    spec.supply.availableKw[0] = -1;
    spec.grid.importPrice[0] = -1;
    expect(series).toEqual([7, 8, 9]);
    expect(input.grid.importPrice).toEqual([1, 2, 3]);
  });

  it('produces exactly the fields of the resolved schema, for every demo-like combination', () => {
    const spec = resolved({
      ...minimal(),
      siteLoad: { kw: [1, 1, 1] },
      grid: { importPrice: 0.2 },
      units: [{ id: 'g', kind: 'generator', ratingKw: 10 }],
      storage: [{ id: 'b', capacityKwh: 10, maxChargeKw: 5, maxDischargeKw: 5, initialSocKwh: 2 }],
    });
    expect(resolvedSiteSpecSchema.safeParse(spec).error).toBeUndefined();
  });
});
