import { readFileSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { solveSite } from '../../api/src/engine/solve-site';
import { resolve } from './synthetic-sites';

const pool = new HighsSolverPool();
afterAll(() => pool.close());

const dir = '/work/shared/reference-cases/';
const load = (file: string) => resolve(JSON.parse(readFileSync(dir + file, 'utf8')));

// Optima from /work/shared/reference-cases/README.md: derived by hand there and confirmed with
// CBC 2.10.8 and GLPK 5.0 on the plain formulation. In short:
// - battery: buy 2 000 kW at 0.02 and 0.01, sell 1 240 kW at 0.05 and 2 000 kW at 0.08 (η 0.9 each way) = 162;
// - generator 10 000 kW, min 4 000, 0.03/kWh, start 50, prices 0.05,0,0,0.05,0,0.05: each minimum
//   up/down pair forces a different block pattern (450, 380, 260, 230);
// - sparse set: the load can run only at steps 1, 2, 4, so two starts: 840 − 60 = 780 (810 if a
//   pruned step were skipped over when counting starts).
const cases: [string, number][] = [
  ['battery-arbitrage.json', 162],
  ['min-up-1-down-1.json', 450],
  ['min-up-1-down-2.json', 380],
  ['min-up-3-down-1.json', 260],
  ['min-up-3-down-2.json', 230],
  ['sparse-set-gap.json', 780],
];

describe('reference cases through solveSite', () => {
  for (const [file, optimum] of cases) {
    for (const reductions of [true, false]) {
      it(`${file} reaches ${optimum} with reductions ${reductions ? 'on' : 'off'}`, async () => {
        const spec = load(file);
        if (!reductions) spec.solver.reductions = { sparseSets: false, tightBigM: false, scaling: false, relaxExclusivity: false, independentBlocks: false };
        const r = await solveSite(spec, { solver: pool });
        expect(r.outcome).toBe('optimal');
        expect(r.objective.value!).toBeCloseTo(optimum, 6);
      });
    }
  }

  it('counts a start after a pruned step as a new start (sparse-set-gap)', async () => {
    const r = await solveSite(load('sparse-set-gap.json'), { solver: pool });
    expect(r.schedule!.units.u.on).toEqual([0, 1, 1, 0, 1, 0]);
    expect(r.kpis!.units.u.starts).toBe(2);
    // Steps 0, 3 and 5 have less than the 2 000 kW minimum stable load available: no binaries there.
    expect(r.model.binariesPruned).toBe(3);
  });

  it('does not start a unit whose minimum up time would run into a step where it cannot run', async () => {
    // Hand derivation: the 1 kW load (min stable 1 kW, min up 2) has supply only at step 0, so a
    // start there would have to stay on at step 1 with nothing to run on: it stays off, value 0.
    const spec = resolve({
      horizon: { start: '2027-06-01T00:00:00+02:00', stepMinutes: 30, steps: 2 },
      supply: { availableKw: [3.5, 0] },
      units: [{ id: 'u0', kind: 'flexible-load', ratingKw: 1, minStableKw: 1, valuePerKwh: 0.01, minUpSteps: 2 }],
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.objective.value).toBe(0);
    expect(r.schedule!.units.u0.on).toEqual([0, 0]);
  });

  it('reproduces the battery schedule of the derivation', async () => {
    const r = await solveSite(load('battery-arbitrage.json'), { solver: pool });
    const b = r.schedule!.storage.b;
    expect(b.chargeKw).toEqual([2000, 0, 2000, 0]);
    expect(b.dischargeKw.map((v) => Math.round(v * 1e6) / 1e6)).toEqual([0, 1240, 0, 2000]);
  });
});
