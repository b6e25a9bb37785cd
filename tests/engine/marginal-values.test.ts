import { afterAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { resolve } from './synthetic-sites';

// The marginal value of energy at a step is what one more kWh delivered to the site there is worth
// (the balance row's dual, with on/off decisions fixed); of a store's product, what one more unit in
// the store is worth. Each expectation is derived by hand from which asset is marginal at that step.
const pool = new HighsSolverPool();
afterAll(() => pool.close());

const quarterHours = (steps: number) => ({ start: '2027-05-01T00:00:00Z', stepMinutes: 15, steps });

describe('marginal values', () => {
  it('is the import price where import is marginal, the export price where export is, 0 where supply is curtailed', async () => {
    // Quarter-hour steps, so a mistake in Δh shows. Step 0: 10 kW load, no supply: the next kWh is
    // bought at 0.20. Step 1: 100 kW supply, 10 kW load, 40 kW export limit at 0.05: 40 exported,
    // 50 curtailed: a kWh more is worth nothing. Step 2: 30 kW supply, 10 kW load: 20 exported below
    // the limit, so a kWh more is sold at 0.05 (a kWh less of load frees one to sell).
    const spec = resolve({
      horizon: quarterHours(3),
      supply: { availableKw: [0, 100, 30] },
      siteLoad: { kw: [10, 10, 10] },
      grid: { importLimitKw: 50, exportLimitKw: 40, importPrice: 0.2, exportPrice: 0.05 },
    });
    const r = await solveSite(spec, { solver: pool });
    const v = r.schedule!.marginalValues.energyPerKwh;
    expect(v[0]).toBeCloseTo(0.2, 9);
    expect(v[1]).toBeCloseTo(0, 9);
    expect(v[2]).toBeCloseTo(0.05, 9);
  });

  it('is the flexible load’s value where it takes the last kWh, and follows its value curve', async () => {
    // 100 kW of supply on an island, a 150 kW electrolyser-like load worth 0.12/kWh up to 60 kW and
    // 0.08 above: it takes all 100 kW, the last kWh in its second slice, so a kWh more is worth 0.08;
    // with 40 kW of supply its last kWh is in the first slice: 0.12.
    const spec = resolve({
      horizon: quarterHours(2),
      supply: { availableKw: [100, 40] },
      units: [{ id: 'ely', kind: 'flexible-load', ratingKw: 150, valueCurve: [{ upToKw: 60, valuePerKwh: 0.12 }, { upToKw: 150, valuePerKwh: 0.08 }] }],
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.schedule!.marginalValues.energyPerKwh[0]).toBeCloseTo(0.08, 9);
    expect(r.schedule!.marginalValues.energyPerKwh[1]).toBeCloseTo(0.12, 9);
  });

  it('prices a store’s product at its shortfall penalty when the demand is short, and at the cost of making it otherwise', async () => {
    // Hourly steps. A tank of 10 kg, empty, with a soft demand of 5 kg/h at a penalty of 6/kg. An
    // electrolyser of 100 kW makes 0.02 kg/kWh from power imported at 0.1/kWh: a kg costs 0.1/0.02 =
    // 5 < 6, so it runs to meet the demand where it can. Step 0: only 40 kW may be imported, so it
    // makes 0.8 kg of the 5: short, and a kg more in the tank saves the penalty: 6. Step 1: the
    // import limit is 500 kW and the demand is met by making it: a kg more saves making one: 5.
    const spec = resolve({
      horizon: { start: '2027-05-01T00:00:00Z', stepMinutes: 60, steps: 2 },
      supply: { availableKw: [0, 0] },
      grid: { importLimitKw: 500, importPrice: 0.1 },
      siteLoad: { kw: [460, 0] },
      units: [{ id: 'ely', kind: 'flexible-load', ratingKw: 500, produces: { store: 'tank', perKwh: 0.02 } }],
      stores: [{ id: 'tank', capacity: 10, initial: 0, demandPerHour: 5, shortfallPenaltyPerUnit: 6 }],
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.schedule!.stores.tank.shortfall[0]).toBeCloseTo(4.2, 6);
    const value = r.schedule!.marginalValues.stores.tank;
    expect(value[0]).toBeCloseTo(6, 6);
    expect(value[1]).toBeCloseTo(5, 6);
  });
});
