import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { coefficientRanges, rangesOutsideBand } from '../../api/src/engine/coefficient-ranges';
import { ModelAssembler } from '../../api/src/engine/model-assembler';
import { ColKind, RowKind } from '../../api/src/engine/model-arrays';
import { HEALTHY_COEFFICIENT_BAND } from '../../api/src/engine/numerics';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { resolve } from './synthetic-sites';

const pool = new HighsSolverPool({ size: 2 });
afterAll(() => pool.close());

/** An invented grid-scale pumped-storage site: 3 GWh of storage behind a 600 MW connection, hourly for a day. */
function pumpedStorageSite(opts: { scaling: boolean; mode: 'monolithic' | 'rolling' }): ResolvedSiteSpec {
  const price = Array.from({ length: 24 }, (_, h) => (h >= 7 && h < 21 ? 0.12 : 0.02));
  return resolve({
    name: 'Upper basin',
    horizon: { start: '2027-06-01T00:00:00Z', stepMinutes: 60, steps: 24 },
    supply: { availableKw: Array(24).fill(0) },
    grid: { importLimitKw: 600_000, exportLimitKw: 600_000, importPrice: price, exportPrice: price.map((p) => p * 0.9) },
    storage: [
      {
        id: 'basin',
        capacityKwh: 3_000_000,
        maxChargeKw: 500_000,
        maxDischargeKw: 500_000,
        chargeEfficiency: 0.9,
        dischargeEfficiency: 0.9,
        minSocKwh: 300_000,
        initialSocKwh: 1_500_000,
      },
    ],
    solver: {
      mode: opts.mode,
      window: { windowSteps: 12, commitSteps: 6, segmentWindows: 0 },
      reductions: { scaling: opts.scaling },
    },
  });
}

describe('coefficient ranges', () => {
  it('finds the kinds whose span leaves the healthy band, bounds included', () => {
    const [low, high] = HEALTHY_COEFFICIENT_BAND;
    expect(rangesOutsideBand({ matrix: [low, high], objective: [1, 1], bounds: null, rhs: null })).toEqual({});
    expect(rangesOutsideBand({ matrix: [1, 1], objective: [low / 2, 1], bounds: [1, high * 2], rhs: [1, 3] })).toEqual({
      objective: [low / 2, 1],
      bounds: [1, high * 2],
    });
  });

  it('writes a row bound of float noise as 0, so it does not count as a coefficient', () => {
    // 0.1 + 0.2 − 0.3 is 5.6e-17 in floating point: what a carried start level minus a step's net demand can leave.
    const a = new ModelAssembler();
    const x = a.col(ColKind.StoreLevel, 0, 0, 1, 0, 2);
    a.row(RowKind.StoreLevel, 0, 0, 0.1 + 0.2 - 0.3, 0.1 + 0.2 - 0.3);
    a.entry(x, 1);
    a.row(RowKind.StoreLevel, 1, 0, 0.5, 0.5);
    a.entry(x, 1);
    const { model } = a.finish();
    expect(Array.from(model.rowLower)).toEqual([0, 0.5]);
    expect(coefficientRanges(model).rhs).toEqual([0.5, 0.5]);
  });

  it('warns once per run when a model with scaling off leaves the band, naming the cause', async () => {
    const r = await solveSite(pumpedStorageSite({ scaling: false, mode: 'rolling' }), { solver: pool });
    expect(r.outcome).toBe('feasible');
    // Unscaled, the basin's SOC column runs up to its capacity, 3e6 kWh, and the first SOC row's
    // right-hand side is the initial 1.5e6 kWh: both above the band's 1e6.
    expect(r.model.coefficientRange.bounds![1]).toBe(3_000_000);
    expect(r.model.windows.length).toBeGreaterThan(1);
    const found = r.warnings.filter((w) => w.code === 'coefficient-range');
    expect(found).toHaveLength(1);
    expect(found[0].pointer).toBe('/solver/reductions/scaling');
    expect(found[0].message).toContain('bounds [3.0e+5, 3.0e+6]');
    expect(found[0].message).toMatch(/scaling is off/);
    // Every window holds the basin, so every window left the band: one range over the whole day.
    expect(found[0].steps).toEqual([{ from: 0, to: 23 }]);
  });

  it('stays silent for the same site with scaling on', async () => {
    const r = await solveSite(pumpedStorageSite({ scaling: true, mode: 'rolling' }), { solver: pool });
    expect(r.outcome).toBe('feasible');
    // Powers span 5e5–3e6 kW, so the power unit is 1e6 kW (their geometric middle, a power of
    // ten) and the SOC bound becomes 3.
    expect(r.model.scale.powerKw).toBe(1_000_000);
    expect(r.model.coefficientRange.bounds![1]).toBeCloseTo(3, 12);
    expect(r.warnings.filter((w) => w.code === 'coefficient-range')).toEqual([]);
  });
});
