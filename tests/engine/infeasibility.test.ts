import { afterAll, describe, expect, it } from 'vitest';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { solveSite } from '../../api/src/engine/solve-site';
import { specWarnings } from '../../api/src/engine/spec-warnings';
import { resolve } from './synthetic-sites';

const pool = new HighsSolverPool();
afterAll(() => pool.close());

describe('infeasible specs', () => {
  it('names the steps where a hard load exceeds everything that could supply it, before solving', async () => {
    // Hand check: at steps 2–4 the load (50 kW) is above solar (10) + import (20) = 30 kW.
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 6 },
      supply: { availableKw: [40, 40, 10, 10, 10, 40] },
      siteLoad: { kw: [30, 30, 50, 50, 50, 30] },
      grid: { importLimitKw: 20, importPrice: 0.3 },
    });
    const r = await solveSite(spec, { solver: pool });
    // An infeasible spec is an outcome the engine returns; the run's status is the worker's to set.
    expect(r).not.toHaveProperty('status');
    expect(r.outcome).toBe('infeasible');
    expect(r.schedule).toBeNull();
    const w = r.warnings.find((x) => x.code === 'hard-load-exceeds-supply')!;
    expect(w.pointer).toBe('/siteLoad/kw');
    expect(w.steps).toEqual([{ from: 2, to: 4 }]);
    expect(w.message).toMatch(/steps 2–4/);
    expect(r.model.windows).toHaveLength(0);
  });

  it('maps the solver’s infeasible subsystem back to the storage and the load', async () => {
    // Every step alone is coverable (10 kW load ≤ 10 kW discharge), but 4 h × 10 kW = 40 kWh
    // exceeds the 20 kWh above minSoc: only the SOC chain over several steps shows the conflict.
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 4 },
      supply: { availableKw: [0, 0, 0, 0] },
      siteLoad: { kw: [10, 10, 10, 10] },
      storage: [{ id: 'bess', capacityKwh: 40, maxChargeKw: 10, maxDischargeKw: 10, minSocKwh: 10, initialSocKwh: 30 }],
    });
    expect(specWarnings(spec).filter((w) => w.code === 'hard-load-exceeds-supply')).toHaveLength(0);
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('infeasible');
    const pointers = r.warnings.map((w) => w.pointer);
    expect(r.warnings.some((w) => w.code === 'infeasible-subsystem')).toBe(true);
    expect(pointers.some((p) => p?.startsWith('/storage/0'))).toBe(true);
  });

  it('flags an initial state that forces a unit on where it cannot run', async () => {
    const spec = resolve({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 4 },
      supply: { availableKw: [0, 0, 50, 50] },
      units: [{ id: 'ely', kind: 'flexible-load', ratingKw: 40, minStableKw: 20, minUpSteps: 3, initial: { on: true, stepsInState: 1 } }],
    });
    const r = await solveSite(spec, { solver: pool });
    expect(r.outcome).toBe('infeasible');
    const w = r.warnings.find((x) => x.code === 'initial-state-conflict')!;
    expect(w.pointer).toBe('/units/0/initial');
    expect(w.steps).toEqual([{ from: 0, to: 1 }]);
  });

  it('warns without solving about a unit that can never run and an unreachable final SOC', () => {
    const warnings = specWarnings(
      resolve({
        horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps: 3 },
        supply: { availableKw: [5, 5, 5] },
        units: [{ id: 'big', kind: 'flexible-load', ratingKw: 100, minStableKw: 50 }],
        storage: [{ id: 'b', capacityKwh: 100, maxChargeKw: 10, maxDischargeKw: 10, initialSocKwh: 0, finalSocKwh: 90 }],
      }),
    );
    expect(warnings.map((w) => [w.code, w.pointer])).toEqual(
      expect.arrayContaining([
        ['min-stable-unreachable', '/units/0/minStableKw'],
        ['final-soc-unreachable', '/storage/0/finalSocKwh'],
      ]),
    );
  });
});
