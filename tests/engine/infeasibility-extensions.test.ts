import { afterAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { resolve } from './synthetic-sites';

// SPEC §3: an infeasible spec gets a diagnosis that names the steps and the parts of the spec in
// conflict. Each case below is infeasible by a hand argument written beside it.
const pool = new HighsSolverPool();
afterAll(() => pool.close());

const hour = (steps: number) => ({ start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps });

describe('infeasibility in the v1.1 parts, named by pointer and steps', () => {
  it('a hard reserve the online fleet can never hold', async () => {
    // Two generators of 100 kW (min stable 20) hold at most 2·(100 − 20) = 160 kW of headroom; 200 kW at step 1 cannot be held.
    const spec = resolve({
      horizon: hour(3),
      supply: { availableKw: [0, 0, 0] },
      siteLoad: { kw: [40, 40, 40] },
      units: [
        { id: 'a', kind: 'generator', ratingKw: 100, minStableKw: 20, costPerKwh: 0.2 },
        { id: 'b', kind: 'generator', ratingKw: 100, minStableKw: 20, costPerKwh: 0.2 },
      ],
      reserve: { upKw: [50, 200, 50] },
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('infeasible');
    expect(r.warnings).toContainEqual(expect.objectContaining({ code: 'reserve-unholdable', pointer: '/reserve/upKw', steps: [{ from: 1, to: 1 }] }));
  });

  it('a store demand the producers can never meet', async () => {
    // One pump of 10 kW at 2 m³/kWh makes at most 20 m³ an hour; a hard demand of 30 m³ an hour
    // from a 20 m³ basin holding 15 m³ runs out within the second hour.
    const spec = resolve({
      horizon: hour(4),
      supply: { availableKw: [10, 10, 10, 10] },
      units: [{ id: 'pump', kind: 'flexible-load', ratingKw: 10, produces: { store: 'basin', perKwh: 2 } }],
      stores: [{ id: 'basin', capacity: 20, initial: 15, demandPerHour: 30 }],
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('infeasible');
    const w = r.warnings.find((x) => x.code === 'store-demand-unmet')!;
    expect(w.pointer).toBe('/stores/0/demandPerHour');
    // 15 + 20 − 30 = 5 after step 0; 5 + 20 − 30 < 0 at step 1.
    expect(w.steps).toEqual([{ from: 1, to: 1 }]);
  });

  it('a ramp that cannot reach a hard load in time', async () => {
    // An off generator (ramp 1 kW/min = 60 kW per step, start allowance max(30, 60) = 60 kW) can put
    // out 60, 120, 180 kW at steps 0–2; the island's hard load of 150 kW at step 1 is out of reach,
    // though the rating (300 kW) would cover it.
    const spec = resolve({
      horizon: hour(3),
      supply: { availableKw: [0, 0, 0] },
      siteLoad: { kw: [50, 150, 150] },
      units: [{ id: 'gen', kind: 'generator', ratingKw: 300, minStableKw: 30, costPerKwh: 0.2, rampUpKwPerMin: 1 }],
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('infeasible');
    expect(r.warnings).toContainEqual(expect.objectContaining({ code: 'ramp-cannot-reach-load', pointer: '/units/0/rampUpKwPerMin', steps: [{ from: 1, to: 1 }] }));
  });

  it('maps the solver’s infeasible subsystem to the store and the units that feed it', async () => {
    // No pre-check sees this one: the basin's final level of 20 m³ needs 10 m³ made, but the only
    // pump (min stable 8 kW, 1 m³/kWh) can run only where supply reaches 8 kW — nowhere. The
    // demand is soft, so only the final level makes it infeasible.
    const spec = resolve({
      horizon: hour(3),
      supply: { availableKw: [5, 5, 5] },
      units: [{ id: 'pump', kind: 'flexible-load', ratingKw: 10, minStableKw: 8, produces: { store: 'basin', perKwh: 1 } }],
      stores: [{ id: 'basin', capacity: 30, initial: 10, final: 20, demandPerHour: 0, shortfallPenaltyPerUnit: 1 }],
      solver: { reductions: { sparseSets: false } },
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('infeasible');
    const pointers = r.warnings.filter((w) => w.code === 'infeasible-subsystem').map((w) => w.pointer);
    expect(pointers.some((p) => p?.startsWith('/stores/0'))).toBe(true);
  });
});
