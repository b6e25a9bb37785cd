/**
 * Invented sites of our own, one SPEC §5 rule each, whose optimum is derived by hand beside it.
 * Each is solved by the engine with every reduction on and with every reduction off, and by our
 * plain formulation in GLPK; all three must reach the hand-derived optimum (1e-6 relative), and
 * the engine's schedule must show what the derivation says it does. Hourly steps unless said
 * otherwise, so kW and kWh are the same figure; the objective is maximised, a pure cost negative.
 */
import { afterAll, describe, expect, it } from 'vitest';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { solveSite, type SiteSolution } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { defaultSolverThreads } from '../../api/src/solver/solver-threads';
import { expectObjectiveTerms, expectSeries, expectVerifiedOptimum } from './support/check-result';
import { solvePlain } from './support/plain-formulation';
import { ALL_REDUCTIONS_OFF, ALL_REDUCTIONS_ON, closeRel, monolithic, resolveSpec } from './support/specs';

const solver = new HighsSolverPool({ size: defaultSolverThreads() });
afterAll(() => solver.close());

interface HandCase {
  name: string;
  spec: ResolvedSiteSpec;
  optimum: number;
  /** What else the derivation pins down in the engine's result. */
  expectResult?: (result: SiteSolution) => void;
}

const START = '2027-09-06T00:00:00+02:00';

/** A CHP genset that exports power and fills a heat store, with or without leave to spill heat. */
function chpWithHeatStore(spillAllowed: boolean): ResolvedSiteSpec {
  return resolveSpec({
    horizon: { start: START, stepMinutes: 60, steps: 2 },
    supply: { availableKw: [0, 0] },
    grid: { exportLimitKw: 200, exportPrice: 0.2 },
    units: [{ id: 'chp', kind: 'generator', ratingKw: 100, minStableKw: 60, costPerKwh: 0.05, produces: { store: 'heat', perKwh: 0.5 } }],
    stores: [{ id: 'heat', product: 'heat', unit: 'kWh-th', capacity: 50, initial: 40, demandPerHour: 10, spillAllowed }],
  });
}

const CASES: HandCase[] = [
  {
    // Island, hard load 150 then 50 kW. Two small gensets of 80 kW at 0.20/kWh idling at 12/h,
    // one big of 160 kW at 0.22/kWh idling at 4/h. At 150 kW: big alone 4 + 33 = 37; both small
    // 24 + 30 = 54; a small at 80 plus the big at 70, 16 + 16 + 15.4 = 47.4 (one small cannot
    // carry it). At 50 kW: big 4 + 11 = 15, one small 12 + 10 = 22. The big one runs alone:
    // −(37 + 15) = −52 (energy −44, no-load −8). Without idling costs the small pair would win
    // at 150 kW (30 against 33).
    name: 'a no-load cost makes one big genset cheaper than two small ones',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 2 },
      supply: { availableKw: [0, 0] },
      siteLoad: { kw: [150, 50] },
      units: [
        { id: 'small-a', kind: 'generator', ratingKw: 80, costPerKwh: 0.2, noLoadCostPerHour: 12 },
        { id: 'small-b', kind: 'generator', ratingKw: 80, costPerKwh: 0.2, noLoadCostPerHour: 12 },
        { id: 'big', kind: 'generator', ratingKw: 160, costPerKwh: 0.22, noLoadCostPerHour: 4 },
      ],
    }),
    optimum: -52,
    expectResult: (r) => {
      expect(r.schedule!.units.big.on).toEqual([1, 1]);
      expect(r.schedule!.units['small-a'].on).toEqual([0, 0]);
      expect(r.schedule!.units['small-b'].on).toEqual([0, 0]);
      expectObjectiveTerms(r, { noLoad: -8, energy: -44 });
    },
  },
  {
    // A genset of 100 kW (min stable 40, 0.10/kWh), on before the horizon, exports up to 100 kW
    // at 0.30, 0, 0, 0.30. Start: hot 5 after at most 1 step off, cold 30 after longer. Full
    // output at steps 0 and 3 earns 0.20·100 = 20 each. The two-step dip: on at 40 kW costs
    // 2·4 = 8; off for both makes the restart cold, 30; off for one step and on at 40 for the
    // other costs 4 + a hot 5 = 9. Staying on wins: 40 − 8 = 32. With one start price of 5 the
    // stop would win (40 − 5 = 35): the cold start is what keeps the unit on.
    name: 'a cold start makes it worth staying on through a short dip',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 4 },
      supply: { availableKw: [0, 0, 0, 0] },
      grid: { importLimitKw: 0, exportLimitKw: 100, exportPrice: [0.3, 0, 0, 0.3] },
      units: [{
        id: 'genset', kind: 'generator', ratingKw: 100, minStableKw: 40, costPerKwh: 0.1,
        startupCost: { hot: 5, cold: 30, coldAfterSteps: 1 }, initial: { on: true },
      }],
    }),
    optimum: 32,
    expectResult: (r) => {
      expect(r.schedule!.units.genset.on).toEqual([1, 1, 1, 1]);
      expectSeries('genset', r.schedule!.units.genset.powerKw, [100, 40, 40, 100]);
      expectObjectiveTerms(r, { starts: 0 });
    },
  },
  {
    // Hard load of 300 kW at step 2 only; import at 1.00, export allowed at 0 (earlier output is
    // given away). A genset of 300 kW, min stable 60, 0.10/kWh, ramping up 2 kW/min = 120 kW a
    // step (start allowance max(60, 120) = 120), off before. To give 300 kW at step 2 it must
    // run 180 at step 1 and at least 60 at step 0: starting at step 0 costs 0.10·(60 + 180 + 300)
    // = 54 and imports nothing. Starting at step 1 (120, 240) imports 60: 60 + 36 = 96; at step 2
    // (120): 180 + 12 = 192. Running lower anywhere swaps 0.10 of fuel for 1.00 of import. The
    // ramp forces the start two steps early: −54.
    name: 'a ramp forces an early start',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 3 },
      supply: { availableKw: [0, 0, 0] },
      siteLoad: { kw: [0, 0, 300] },
      grid: { importLimitKw: 300, exportLimitKw: 300, importPrice: 1, exportPrice: 0 },
      units: [{ id: 'genset', kind: 'generator', ratingKw: 300, minStableKw: 60, costPerKwh: 0.1, rampUpKwPerMin: 2 }],
    }),
    optimum: -54,
    expectResult: (r) => {
      expectSeries('genset', r.schedule!.units.genset.powerKw, [60, 180, 300]);
      expectSeries('import', r.schedule!.grid.importKw, [0, 0, 0]);
    },
  },
  {
    // Island, hard load 100 kW in both steps; spinning reserve 0 then 50 kW, hard. "main": 120 kW,
    // min stable 30, 0.10/kWh; "second": 60 kW, min stable 20, 0.30/kWh, idling 2/h. At step 0
    // main carries the load alone: 10. At step 1 main alone holds only 120 − 100 = 20 < 50, so
    // the second must be on; at its minimum 20 kW it holds 40 and main (at 80) holds 40: 80 ≥ 50.
    // More from the second only costs more. Step 1: 8 + 6 + 2 = 16. Total −26.
    name: 'a reserve forces a second unit online',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 2 },
      supply: { availableKw: [0, 0] },
      siteLoad: { kw: [100, 100] },
      units: [
        { id: 'main', kind: 'generator', ratingKw: 120, minStableKw: 30, costPerKwh: 0.1 },
        { id: 'second', kind: 'generator', ratingKw: 60, minStableKw: 20, costPerKwh: 0.3, noLoadCostPerHour: 2 },
      ],
      reserve: { upKw: [0, 50] },
    }),
    optimum: -26,
    expectResult: (r) => {
      expect(r.schedule!.units.second.on).toEqual([0, 1]);
      expectSeries('main', r.schedule!.units.main.powerKw, [100, 80]);
      expectSeries('second', r.schedule!.units.second.powerKw, [0, 20]);
      expectSeries('reserve held', r.schedule!.reserve!.providedKw, [20, 80]);
    },
  },
  {
    // Load 80, 200, 120, 160 kW; import at 0.10; a demand charge of 5 per kW of the highest
    // import over the whole horizon, above the 100 kW already set this period. A lossless
    // battery of 200 kWh, 100 kW each way, at 100 kWh and due back at 100 kWh. The energy
    // imported is the load's 560 kWh whatever the battery does, so only the peak can move, and
    // it can go no lower than the average, 140 kW: charge 60 at step 0, give 60 at step 1,
    // charge 20 at step 2, give 20 at step 3 (SOC 160, 100, 120, 100; power within 100). Energy
    // −56, demand charge −5·(140 − 100) = −200: −256.
    name: 'a demand charge flattens the peak to the average load',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 4 },
      supply: { availableKw: [0, 0, 0, 0] },
      siteLoad: { kw: [80, 200, 120, 160] },
      grid: { importLimitKw: 400, importPrice: 0.1, demandCharges: [{ id: 'monthly', pricePerKw: 5, existingPeakKw: 100 }] },
      storage: [{ id: 'bess', capacityKwh: 200, maxChargeKw: 100, maxDischargeKw: 100, initialSocKwh: 100, finalSocKwh: 100 }],
    }),
    optimum: -256,
    expectResult: (r) => {
      expectSeries('import', r.schedule!.grid.importKw, [140, 140, 140, 140]);
      expectSeries('soc', r.schedule!.storage.bess.socKwh, [160, 100, 120, 100]);
      expect(closeRel(r.kpis!.demandCharges.monthly.peakKw, 140)).toBe(true);
      expect(closeRel(r.kpis!.demandCharges.monthly.cost, 200)).toBe(true);
      expectObjectiveTerms(r, { demandCharges: -200 });
    },
  },
  {
    // A pump (flexible load, 60 kW, no value of its own) lifts 1 m³ per kWh into a reservoir
    // of 60 m³ that starts at 20 and feeds a hard demand of 10, 10, 80, 10 m³; import at 0.10,
    // 0.12, 0.40, 0.15. At step 2 the reservoir can hold at most 60 from before, so at least
    // 80 − 60 = 20 m³ must be pumped in the dearest hour. Filling it by the end of step 1 is
    // cheapest at step 0 (0.10), up to the brim: 20 − 10 + q₀ = 60, q₀ = 50; then q₁ = 10 keeps
    // it full against step 1's demand; q₂ = 20; q₃ = 10 for the last demand. Cost 5 + 1.2 + 8 +
    // 1.5 = 15.7. One more m³ in the reservoir at step t, or one more kWh delivered, saves the
    // pumping of that step: both marginal values are the import prices (the pump is strictly
    // inside its range every step, so they are unique).
    name: 'a reservoir whose demand forces pumping in the dearest hour',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 4 },
      supply: { availableKw: [0, 0, 0, 0] },
      grid: { importLimitKw: 100, importPrice: [0.1, 0.12, 0.4, 0.15] },
      units: [{ id: 'pump', kind: 'flexible-load', ratingKw: 60, produces: { store: 'reservoir', perKwh: 1 } }],
      stores: [{ id: 'reservoir', product: 'water', unit: 'm3', capacity: 60, initial: 20, demandPerHour: [10, 10, 80, 10] }],
    }),
    optimum: -15.7,
    expectResult: (r) => {
      expectSeries('pump', r.schedule!.units.pump.powerKw, [50, 10, 20, 10]);
      expectSeries('reservoir', r.schedule!.stores.reservoir.level, [60, 60, 0, 0]);
      expectSeries('value of water', r.schedule!.marginalValues.stores.reservoir, [0.1, 0.12, 0.4, 0.15]);
      expectSeries('value of energy', r.schedule!.marginalValues.energyPerKwh, [0.1, 0.12, 0.4, 0.15]);
    },
  },
  {
    // Island, hard load 40 then 90 kW. "base": 100 kW with a convex cost curve, 0.10/kWh up to
    // 60 kW and 0.25/kWh from 60 to 100; "peaker": 100 kW at 0.20 flat. At 40 kW base's cheap
    // slice covers it: 4. At 90 kW base's cheap slice fills first (60 kW, 6), and the next 30 kW
    // come from the peaker (0.20) rather than base's dear slice (0.25): 6. Total −16.
    name: 'a convex cost curve fills its cheaper slice first',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 2 },
      supply: { availableKw: [0, 0] },
      siteLoad: { kw: [40, 90] },
      units: [
        { id: 'base', kind: 'generator', ratingKw: 100, costCurve: [{ upToKw: 60, costPerKwh: 0.1 }, { upToKw: 100, costPerKwh: 0.25 }] },
        { id: 'peaker', kind: 'generator', ratingKw: 100, costPerKwh: 0.2 },
      ],
    }),
    optimum: -16,
    expectResult: (r) => {
      expectSeries('base', r.schedule!.units.base.powerKw, [40, 60]);
      expectSeries('peaker', r.schedule!.units.peaker.powerKw, [0, 30]);
    },
  },
  {
    // An electrolyser of 100 kW on the grid (import at 0.20, then 0.10) with a concave value
    // curve: 0.30/kWh for its first 40 kW, 0.12/kWh for the next 60. At 0.20 only the first
    // slice pays: 40 kW, 40·0.10 = 4. At 0.10 both do: 40·0.20 + 60·0.02 = 9.2. Total 13.2.
    name: 'a concave value curve takes only the slices worth the price',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 2 },
      supply: { availableKw: [0, 0] },
      grid: { importLimitKw: 200, importPrice: [0.2, 0.1] },
      units: [{ id: 'ely', kind: 'flexible-load', ratingKw: 100, valueCurve: [{ upToKw: 40, valuePerKwh: 0.3 }, { upToKw: 100, valuePerKwh: 0.12 }] }],
    }),
    optimum: 13.2,
    expectResult: (r) => expectSeries('ely', r.schedule!.units.ely.powerKw, [40, 100]),
  },
  {
    // A CHP genset (100 kW, min stable 60, 0.05/kWh) exports at 0.20 and puts 0.5 units of heat
    // per kWh into a 50-unit heat store that starts at 40 and feeds 10 units an hour; spilling
    // heat is allowed. Full output both steps earns 0.15·200 = 30, making 50 units an hour
    // against a demand of 10: the store overflows and the excess is spilled. Without spill
    // (the next case) the store caps the genset.
    name: 'a spill that pays',
    spec: chpWithHeatStore(true),
    optimum: 30,
    expectResult: (r) => {
      expectSeries('chp', r.schedule!.units.chp.powerKw, [100, 100]);
      // Spill is not unique (the level may sit anywhere its bounds allow), but what goes in must come out.
      const spilled = r.schedule!.stores.heat.spill.reduce((s, x) => s + x, 0);
      expect(closeRel(spilled, 40 + 100 - 20 - r.schedule!.stores.heat.level[1])).toBe(true);
    },
  },
  {
    // The same site with spilling forbidden: the level after step t is 40 + 0.5·Σp − 10·(t + 1)
    // ≤ 50. At step 0 that allows p₀ ≤ 40 < the 60 kW minimum, so the CHP stays off (level 30);
    // at step 1 it allows p₁ ≤ 60: it runs at its minimum, 0.15·60 = 9.
    name: 'the same CHP without spill is capped by its heat store',
    spec: chpWithHeatStore(false),
    optimum: 9,
    expectResult: (r) => {
      expectSeries('chp', r.schedule!.units.chp.powerKw, [0, 60]);
      expectSeries('heat', r.schedule!.stores.heat.level, [30, 50]);
    },
  },
  {
    // A hydrogen tank (empty, 100 kg) owes 5 kg an hour, each kg short costing 2. An
    // electrolyser (300 kW) makes 0.02 kg per kWh, so a kg takes 50 kWh: 5.00 at the 0.10 import
    // price of step 0, 1.50 at the 0.03 of step 1. Below the cost of producing, the penalty is
    // paid at step 0 (2·5 = 10); above it, step 1's 5 kg are made (250 kWh, 7.5). Total −17.5.
    name: 'a shortfall penalty below the cost of producing',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 60, steps: 2 },
      supply: { availableKw: [0, 0] },
      grid: { importLimitKw: 400, importPrice: [0.1, 0.03] },
      units: [{ id: 'ely', kind: 'flexible-load', ratingKw: 300, produces: { store: 'h2', perKwh: 0.02 } }],
      stores: [{ id: 'h2', product: 'hydrogen', unit: 'kg', capacity: 100, initial: 0, demandPerHour: 5, shortfallPenaltyPerUnit: 2 }],
    }),
    optimum: -17.5,
    expectResult: (r) => {
      expectSeries('ely', r.schedule!.units.ely.powerKw, [0, 250]);
      expectSeries('shortfall', r.schedule!.stores.h2.shortfall, [5, 0]);
      expectObjectiveTerms(r, { penalties: -10 });
    },
  },
  {
    // Half-hour steps (Δh = 0.5), load 50 kW throughout; import up to 100 kW at 0.25, export
    // up to 300 kW at 0.08, 0.08, 0.05; supply 0, 200, 120 kW; an electrolyser of 100 kW valuing
    // its energy at 0.12 (no minimum). Step 0: it would import at 0.25 > 0.12, so it is off and
    // the grid serves the load: import is the marginal source, a kWh more delivered saves 0.25.
    // Step 1: 200 kW of supply, 50 to the load, the electrolyser full (0.12 > 0.08), 50 exported:
    // export is the marginal sink, 0.08. Step 2: 120 kW of supply, 50 to the load, the other 70
    // to the electrolyser (0.12 > 0.05 export), which is the marginal consumer: 0.12. Per step the
    // money is Δh·(…): −0.25·50·0.5 + (0.12·100 + 0.08·50)·0.5 + 0.12·70·0.5 = −6.25 + 8 + 4.2 = 5.95.
    // Marginal values are per kWh, so the half-hour steps leave them at the prices themselves.
    name: 'the marginal value of energy is the marginal source’s or sink’s price',
    spec: resolveSpec({
      horizon: { start: START, stepMinutes: 30, steps: 3 },
      supply: { availableKw: [0, 200, 120] },
      siteLoad: { kw: [50, 50, 50] },
      grid: { importLimitKw: 100, exportLimitKw: 300, importPrice: 0.25, exportPrice: [0.08, 0.08, 0.05] },
      units: [{ id: 'ely', kind: 'flexible-load', ratingKw: 100, valuePerKwh: 0.12 }],
    }),
    optimum: 5.95,
    expectResult: (r) => {
      expectSeries('ely', r.schedule!.units.ely.powerKw, [0, 100, 70]);
      expectSeries('value of energy', r.schedule!.marginalValues.energyPerKwh, [0.25, 0.08, 0.12]);
    },
  },
];

const ENGINE_VARIANTS = [
  { label: 'engine, every reduction on', reductions: ALL_REDUCTIONS_ON },
  { label: 'engine, every reduction off', reductions: ALL_REDUCTIONS_OFF },
];

describe.each(CASES)('$name (optimum $optimum)', ({ spec, optimum, expectResult }) => {
  it.each(ENGINE_VARIANTS)('$label', async ({ reductions }) => {
    const result = await solveSite(monolithic(spec, reductions), { solver });
    const value = expectVerifiedOptimum(spec, result);
    expect(closeRel(value, optimum), `objective ${value}, derived ${optimum}`).toBe(true);
    expectResult?.(result);
  });

  it('plain formulation in GLPK', async () => {
    const r = await solvePlain(spec, { mipGap: 1e-9 });
    expect(r.status).toBe('optimal');
    expect(closeRel(r.objective, optimum), `GLPK ${r.objective}, derived ${optimum}`).toBe(true);
  });
});
