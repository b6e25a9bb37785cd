import { describe, expect, it } from 'vitest';
import { chooseSolveMode } from '../../api/src/engine/choose-solve-mode';
import { estimateModelSize } from '../../api/src/engine/estimate-model-size';
import { gridTiedSolarSite, resolve, solarThreeUnitSite } from './synthetic-sites';

describe('auto mode and the size estimate', () => {
  it('keeps short horizons monolithic and switches long, unit-heavy ones to rolling', () => {
    expect(chooseSolveMode(resolve(gridTiedSolarSite({ days: 7, stepMinutes: 60 })))).toBe('monolithic');
    expect(chooseSolveMode(resolve(gridTiedSolarSite({ days: 30, stepMinutes: 60 })))).toBe('rolling');
    expect(chooseSolveMode(resolve(gridTiedSolarSite({ days: 30, stepMinutes: 60, mode: 'monolithic' })))).toBe('monolithic');
  });

  it('keeps a long horizon whole when it falls apart into small independent blocks', () => {
    // Solar only, no storage: at night no unit can run, so each day is a block of its own
    // (30 days × 3 units at 15 min is 8 640 unit-steps; one day's block is under 300).
    const solar = resolve(solarThreeUnitSite({ days: 30, stepMinutes: 15 }));
    expect(chooseSolveMode(solar)).toBe('monolithic');
    expect(chooseSolveMode({ ...solar, solver: { ...solar.solver, reductions: { ...solar.solver.reductions, independentBlocks: false } } })).toBe('rolling');
    // A battery carries energy across the nights: nothing splits.
    const withBattery = resolve({
      ...(solarThreeUnitSite({ days: 30, stepMinutes: 15 }) as object),
      storage: [{ id: 'b', capacityKwh: 100, maxChargeKw: 50, maxDischargeKw: 50, initialSocKwh: 0 }],
    });
    expect(chooseSolveMode(withBattery)).toBe('rolling');
  });

  it('estimates a year at 15 minutes without solving: one window per committed day', () => {
    const spec = resolve(gridTiedSolarSite({ days: 365, stepMinutes: 15 }));
    const estimate = estimateModelSize(spec);
    expect(estimate.mode).toBe('rolling');
    // 36 h windows committing 24 h: 364 windows of one day and a final one of the last day.
    expect(estimate.windows).toBe(365);
    // ⌊365 / 32⌋ = 11 segments side by side.
    expect(estimate.segments).toBe(11);
    expect(estimate.binaries.after).toBeGreaterThan(0);
    expect(estimate.binaries.after).toBeLessThanOrEqual(estimate.binaries.before);
  });
});
