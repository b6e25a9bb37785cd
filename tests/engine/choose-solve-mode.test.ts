import { describe, expect, it } from 'vitest';
import { chooseSolveMode } from '../../api/src/engine/choose-solve-mode';
import { estimateModelSize } from '../../api/src/engine/estimate-model-size';
import { gridTiedSolarSite, resolve } from './synthetic-sites';

describe('auto mode and the size estimate', () => {
  it('keeps short horizons monolithic and switches long, unit-heavy ones to rolling', () => {
    expect(chooseSolveMode(resolve(gridTiedSolarSite({ days: 7, stepMinutes: 60 })))).toBe('monolithic');
    expect(chooseSolveMode(resolve(gridTiedSolarSite({ days: 30, stepMinutes: 60 })))).toBe('rolling');
    expect(chooseSolveMode(resolve(gridTiedSolarSite({ days: 30, stepMinutes: 60, mode: 'monolithic' })))).toBe('monolithic');
  });

  it('estimates a year at 15 minutes without solving: one window per committed day', () => {
    const spec = resolve(gridTiedSolarSite({ days: 365, stepMinutes: 15 }));
    const estimate = estimateModelSize(spec);
    expect(estimate.mode).toBe('rolling');
    // 36 h windows committing 24 h: 364 windows of one day and a final one of the last day.
    expect(estimate.windows).toBe(365);
    expect(estimate.binaries.after).toBeGreaterThan(0);
    expect(estimate.binaries.after).toBeLessThanOrEqual(estimate.binaries.before);
  });
});
