import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { rollingSegments } from '../../api/src/engine/horizon-windows';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { repeatedExample, resolve } from './synthetic-sites';

// SPEC §5, rolling horizon: ramps, hot/cold history, store levels and the demand-charge peaks
// reached so far carry across windows like SOC and on/off state. Every schedule below has also
// passed the independent verifier (solveSite throws otherwise), which checks these rules on the
// stitched schedule, and recomputes the objective term by term.
const pool = new HighsSolverPool({ size: 2 });
afterAll(() => pool.close());

const rolling = (spec: ResolvedSiteSpec, window: Partial<ResolvedSiteSpec['solver']['window']>): ResolvedSiteSpec => ({
  ...spec,
  solver: { ...spec.solver, mode: 'rolling', window: { ...spec.solver.window, ...window } },
});
const monolithic = (spec: ResolvedSiteSpec): ResolvedSiteSpec => ({ ...spec, solver: { ...spec.solver, mode: 'monolithic' } });

/** A demo site repeated `times` over, every per-step series repeated with it. */
const repeated = (id: string, times: number): ResolvedSiteSpec => repeatedExample(id, times, { timeLimitSeconds: 300 });

describe('rolling windows carry the v1.1 state', () => {
  it('ramps across a seam: a generator follows a hard island load up and down over window boundaries', async () => {
    // Hand derivation: the only source is one generator (ramp 2 kW/min = 120 kW per hourly step,
    // start allowance max(60, 120) = 120 kW), so its output must equal the load at every step; the
    // load rises and falls by exactly 120 kW per step across the commit boundaries (every 4 steps),
    // so any window that forgot the previous window's last output would break a ramp.
    const load = [0, 120, 240, 360, 480, 480, 360, 240, 120, 240, 360, 480, 360, 240, 120, 0];
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: load.length },
      supply: { availableKw: new Array(load.length).fill(0) },
      siteLoad: { kw: load },
      units: [{ id: 'gen', kind: 'generator', ratingKw: 500, minStableKw: 60, costPerKwh: 0.2, rampUpKwPerMin: 2, rampDownKwPerMin: 2 }],
    });
    const r = await solveSite(rolling(spec, { windowSteps: 6, commitSteps: 4, segmentWindows: 0 }), { solver: pool });
    expect(r.model.windows.length).toBeGreaterThan(2);
    expect(r.schedule!.units.gen.powerKw).toEqual(load);
  });

  it('hot and cold starts across a seam: a stop near the end of one window makes the next window’s start hot', async () => {
    // Hand derivation: a 100 kW genset (min stable 50, 0.10/kWh, hot 8, cold 20 after more than 2
    // steps off) exports at 0.30 in steps 0–2 and 5–7 and at 0 in 3–4. Staying on through the
    // two-step dip at min stable costs 2·5 = 10; stopping for exactly 2 steps makes the restart hot:
    // 8 < 10. With windows committing 4 steps, the stop (steps 3–4) straddles the boundary at step 4.
    // Value: 6 steps · 100 kW · 0.20 − 8 = 112.
    const exportPrice = [0.3, 0.3, 0.3, 0, 0, 0.3, 0.3, 0.3];
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 8 },
      supply: { availableKw: new Array(8).fill(0) },
      grid: { exportLimitKw: 100, exportPrice },
      units: [{ id: 'gen', kind: 'generator', ratingKw: 100, minStableKw: 50, costPerKwh: 0.1, startupCost: { hot: 8, cold: 20, coldAfterSteps: 2 }, initial: { on: true } }],
    });
    const r = await solveSite(rolling(spec, { windowSteps: 6, commitSteps: 4, segmentWindows: 0 }), { solver: pool });
    expect(r.schedule!.units.gen.on).toEqual([1, 1, 1, 0, 0, 1, 1, 1]);
    expect(r.kpis!.units.gen).toMatchObject({ starts: 1, coldStarts: 0 });
    expect(r.objective.value!).toBeCloseTo(112, 9);
    const whole = await solveSite(monolithic(spec), { solver: pool });
    expect(whole.objective.value!).toBeCloseTo(112, 9);
  });

  it('carries store levels: the power-to-X site over three days rolls within 1 % of the whole-horizon optimum', async () => {
    const spec = repeated('grid-electrolyser', 3);
    const roll = await solveSite(rolling(spec, { windowSteps: 36, commitSteps: 24, segmentWindows: 0 }), { solver: pool });
    const whole = await solveSite(monolithic(spec), { solver: pool });
    expect(roll.kpis!.stores['h2-tank'].finalLevel).toBeGreaterThanOrEqual(250 - 1e-6);
    expect(roll.kpis!.stores['h2-tank'].shortfall).toBeCloseTo(0, 6);
    expect(roll.objective.value!).toBeLessThanOrEqual(whole.objective.value! + 1e-6);
    expect(roll.objective.value!).toBeGreaterThanOrEqual(whole.objective.value! - 0.01 * Math.abs(whole.objective.value!));
  });

  it('carries the demand-charge peak reached so far, and never cuts such a horizon into parallel segments', async () => {
    const spec = rolling(repeated('warehouse-demand-charge', 3), { windowSteps: 72, commitSteps: 48, segmentWindows: 2 });
    expect(rollingSegments(spec)).toHaveLength(1);
    const roll = await solveSite(spec, { solver: pool });
    const whole = await solveSite(monolithic(spec), { solver: pool });
    // The peak each window may still raise is the highest import so far: pricing it anew in each
    // window would pay the charge over again.
    const peak = roll.kpis!.demandCharges['monthly-peak'];
    expect(peak.cost).toBeCloseTo(11.5 * (peak.peakKw - 300), 6);
    expect(roll.objective.value!).toBeGreaterThanOrEqual(whole.objective.value! - 0.01 * Math.abs(whole.objective.value!));
  });

  it('meets ramped outputs and store levels at the seams of parallel segments', async () => {
    const spec = rolling(repeated('grid-electrolyser', 6), { windowSteps: 36, commitSteps: 24, segmentWindows: 2 });
    expect(rollingSegments(spec).length).toBeGreaterThan(1);
    const segmented = await solveSite(spec, { solver: pool });
    const sequence = await solveSite(rolling(spec, { segmentWindows: 0 }), { solver: pool });
    expect(segmented.model.segments).toBeGreaterThan(1);
    expect(segmented.kpis!.stores['h2-tank'].finalLevel).toBeGreaterThanOrEqual(250 - 1e-6);
    expect(Math.abs(segmented.objective.value! - sequence.objective.value!)).toBeLessThanOrEqual(0.01 * Math.abs(sequence.objective.value!));
  });
});
