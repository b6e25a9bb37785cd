import type { RunResult } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { withSiteModelDefaults } from './stored-result';

// A result as a run solved before the v1.1 site model stored it: no stores, reserve, marginal values,
// cold starts, objective terms, store or demand-peak scales.
const stored = {
  status: 'succeeded',
  outcome: 'optimal',
  objective: { value: 12, bound: 12, gap: 0 },
  kpis: {
    suppliedKwh: 3, curtailedKwh: 0, importKwh: 0, exportKwh: 0, unservedKwh: 0,
    units: { u: { energyKwh: 3, starts: 1, onSteps: 2 } },
    storage: {},
  },
  schedule: {
    timestamps: ['2027-03-01T00:00:00+01:00', '2027-03-01T01:00:00+01:00'],
    supplyUsedKw: [1, 2], curtailedKw: [0, 0], unservedKw: [0, 0],
    grid: { importKw: [0, 0], exportKw: [0, 0] },
    units: { u: { on: [1, 1], powerKw: [1, 2] } },
    storage: {},
  },
  model: { scale: { powerKw: 1, money: 1 } },
  warnings: [],
} as unknown as RunResult;

describe('withSiteModelDefaults', () => {
  it('reads a result stored before v1.1 as a site without the v1.1 parts', () => {
    const shown = withSiteModelDefaults(stored);
    expect(shown.schedule).toMatchObject({ stores: {}, reserve: null, marginalValues: { energyPerKwh: [null, null], stores: {} } });
    expect(shown.kpis).toMatchObject({ reserveShortfallKwh: 0, stores: {}, demandCharges: {}, objectiveTerms: null });
    expect(shown.kpis!.units.u.coldStarts).toBe(0);
    expect(shown.model.scale).toEqual({ powerKw: 1, money: 1, stores: {}, demandPeakKw: 1 });
  });

  it('leaves a v1.1 result as it is', () => {
    const v11 = withSiteModelDefaults(stored) as RunResult;
    const terms = { energy: 12, noLoad: 0, starts: 0, demandCharges: 0, penalties: 0, cycleCost: 0 };
    const full = { ...v11, kpis: { ...v11.kpis!, objectiveTerms: terms } };
    expect(withSiteModelDefaults(full)).toEqual(full);
  });

  it('keeps a result without a schedule without one', () => {
    expect(withSiteModelDefaults({ ...stored, schedule: null, kpis: null })).toMatchObject({ schedule: null, kpis: null });
  });
});
