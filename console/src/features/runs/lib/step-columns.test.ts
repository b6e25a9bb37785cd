import type { Schedule } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { stepColumns } from './step-columns';

const v1 = {
  timestamps: ['2027-03-01T00:00:00+01:00', '2027-03-01T01:00:00+01:00'],
  supplyUsedKw: [1, 2],
  curtailedKw: [0, 0],
  unservedKw: [0, 0],
  grid: { importKw: [0, 0], exportKw: [0, 0] },
  units: { 'ely-1': { on: [0, 1], powerKw: [0, 3] } },
  storage: {},
  stores: {},
  reserve: null,
  marginalValues: { energyPerKwh: [0.1, null], stores: {} },
} as Schedule;

const v11: Schedule = {
  ...v1,
  units: { 'gen-a': { on: [1, 1], powerKw: [80, 90], reserveKw: [20, 10] } },
  storage: { bess: { chargeKw: [0, 0], dischargeKw: [0, 0], socKwh: [5, 5], reserveKw: [4, 4] } },
  // As a stored schedule may have them: not in the spec's order.
  stores: {
    pond: { level: [10, 9], shortfall: [0, 1], spill: [0, 0] },
    tank: { level: [400, 380], shortfall: [0, 0], spill: [0, 0] },
  },
  reserve: { requiredKw: [30, 30], providedKw: [24, 14], shortfallKw: [6, 16] },
  marginalValues: { energyPerKwh: [0.3, 0.31], stores: { tank: [1.5, null], pond: [0, 0] } },
};

const labels = (s: Schedule, spec?: Parameters<typeof stepColumns>[1]) => stepColumns(s, spec).map((c) => c.label);

describe('stepColumns', () => {
  it('shows a v1 schedule with its v1 columns and the value of energy only', () => {
    expect(labels(v1)).toEqual(['Supply used kW', 'Curtailed kW', 'Unserved kW', 'Import kW', 'Export kW', 'Value of energy money/kWh', 'ely-1 on', 'ely-1 kW']);
    expect(stepColumns(v1).find((c) => c.key === 'value:energy')!.value(1)).toBeNull();
  });

  it("adds reserve, per-asset reserve, store levels in the store's unit and marginal values, in spec order", () => {
    const spec = { stores: [{ id: 'tank', unit: 'L', capacity: 800, initial: 400 }, { id: 'pond', capacity: 20, initial: 10 }] };
    expect(labels(v11, spec)).toEqual([
      'Supply used kW', 'Curtailed kW', 'Unserved kW', 'Import kW', 'Export kW',
      'Reserve required kW', 'Reserve held kW', 'Reserve short kW', 'Value of energy money/kWh',
      'gen-a on', 'gen-a kW', 'gen-a reserve kW',
      'bess charge kW', 'bess discharge kW', 'bess SOC kWh', 'bess reserve kW',
      'tank level L', 'tank value money/L',
      // pond has no unit in the spec, and a shortfall at step 1 but never a spill.
      'pond level units', 'pond short units/h', 'pond value money/units',
    ]);
    const byKey = Object.fromEntries(stepColumns(v11, spec).map((c) => [c.key, c]));
    expect(byKey['reserve:short'].value(1)).toBe(16);
    expect(byKey['tank:level'].value(1)).toBe(380);
    expect(byKey['tank:value'].value(1)).toBeNull();
    expect(byKey['value:energy'].digits).toBe(4);
  });
});
