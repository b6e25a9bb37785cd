import { describe, expect, it } from 'vitest';
import { resolveDefaults, validateSiteSpec } from '@gridwright/shared/site-spec';

// Every rule below is written in SPEC.md §5 (the v1.1 extensions); each refused spec must be a 400
// whose errors name the field with an RFC 6901 pointer.
const base = () => ({
  horizon: { start: '2027-03-01T00:00:00+01:00', stepMinutes: 60, steps: 3 },
  supply: { availableKw: [0, 5, 10] },
});
const gen = (extra: object = {}) => ({ id: 'g', kind: 'generator', ratingKw: 100, minStableKw: 20, ...extra });
const flex = (extra: object = {}) => ({ id: 'f', kind: 'flexible-load', ratingKw: 50, ...extra });

const errorsOf = (input: unknown) => {
  const r = validateSiteSpec(input);
  return r.ok ? [] : r.errors;
};
const pointers = (input: unknown) => errorsOf(input).map((e) => e.pointer);

describe('site spec v1.1 validation', () => {
  it('accepts a spec using every extension', () => {
    const r = validateSiteSpec({
      ...base(),
      horizon: { ...base().horizon, timeZone: 'Europe/Vienna' },
      grid: {
        importLimitKw: 100,
        demandCharges: [{ id: 'peak', pricePerKw: 12, window: { daysOfWeek: [1, 2, 3, 4, 5], from: '16:00', to: '21:00' }, existingPeakKw: 40 }],
      },
      units: [
        gen({
          noLoadCostPerHour: 5,
          costCurve: [{ upToKw: 60, costPerKwh: 0.2 }, { upToKw: 100, costPerKwh: 0.25 }],
          startupCost: { hot: 10, cold: 30, coldAfterSteps: 4 },
          rampUpKwPerMin: 1,
          rampDownKwPerMin: 2,
          initial: { on: true, stepsInState: 2, powerKw: 50 },
          consumes: { store: 'tank', perKwh: 0.27 },
        }),
        flex({ valueCurve: [{ upToKw: 30, valuePerKwh: 0.1 }, { upToKw: 50, valuePerKwh: 0.07 }], produces: { store: 'h2', perKwh: 0.02 }, providesReserve: true }),
      ],
      storage: [{ id: 'b', capacityKwh: 10, maxChargeKw: 5, maxDischargeKw: 5, initialSocKwh: 2, chargeFromSupplyOnly: true, providesReserve: false }],
      stores: [
        { id: 'tank', product: 'diesel', unit: 'L', capacity: 800, min: 50, initial: 400 },
        { id: 'h2', capacity: 100, initial: 10, final: 10, demandPerHour: [1, 2, 1], lossPerHour: 0.01, shortfallPenaltyPerUnit: 30, spillAllowed: true },
      ],
      reserve: { upKw: [10, 20, 10], shortfallPenaltyPerKwh: 5 },
    });
    expect(r.ok ? [] : r.errors).toEqual([]);
  });

  it('names the slice where a cost curve stops being convex, and where a value curve rises', () => {
    expect(pointers({ ...base(), units: [gen({ costCurve: [{ upToKw: 60, costPerKwh: 0.3 }, { upToKw: 100, costPerKwh: 0.2 }] })] })).toEqual([
      '/units/0/costCurve/1/costPerKwh',
    ]);
    expect(pointers({ ...base(), units: [flex({ valueCurve: [{ upToKw: 20, valuePerKwh: 0.1 }, { upToKw: 50, valuePerKwh: 0.2 }] })] })).toEqual([
      '/units/0/valueCurve/1/valuePerKwh',
    ]);
  });

  it('refuses a curve whose last slice does not end at the rating, or whose slices do not rise', () => {
    expect(pointers({ ...base(), units: [gen({ costCurve: [{ upToKw: 60, costPerKwh: 0.2 }, { upToKw: 90, costPerKwh: 0.3 }] })] })).toEqual([
      '/units/0/costCurve/1/upToKw',
    ]);
    expect(pointers({ ...base(), units: [gen({ costCurve: [{ upToKw: 60, costPerKwh: 0.2 }, { upToKw: 60, costPerKwh: 0.3 }, { upToKw: 100, costPerKwh: 0.3 }] })] })).toEqual([
      '/units/0/costCurve/1/upToKw',
    ]);
  });

  it('refuses a curve on the wrong kind of unit, or beside the figure it replaces', () => {
    expect(pointers({ ...base(), units: [flex({ costCurve: [{ upToKw: 50, costPerKwh: 0.2 }] })] })).toEqual(['/units/0/costCurve']);
    expect(pointers({ ...base(), units: [gen({ costPerKwh: 0.2, costCurve: [{ upToKw: 100, costPerKwh: 0.2 }] })] })).toEqual(['/units/0/costPerKwh']);
  });

  it('refuses a cold start cheaper than a hot one, and hot/cold costs without coldAfterSteps', () => {
    expect(pointers({ ...base(), units: [gen({ startupCost: { hot: 30, cold: 10, coldAfterSteps: 2 } })] })).toEqual(['/units/0/startupCost/cold']);
    expect(errorsOf({ ...base(), units: [gen({ startupCost: { hot: 10, cold: 30 } })] }).length).toBeGreaterThan(0);
  });

  it('names the unit pointer of a link to a store that does not exist', () => {
    expect(pointers({ ...base(), units: [gen({ consumes: { store: 'tank', perKwh: 0.3 } })] })).toEqual(['/units/0/consumes/store']);
    expect(pointers({ ...base(), units: [flex({ produces: { store: 'h2', perKwh: 0.02 } })], stores: [{ id: 'h3', capacity: 1, initial: 0 }] })).toEqual([
      '/units/0/produces/store',
    ]);
  });

  it('refuses an unknown IANA time zone', () => {
    expect(pointers({ ...base(), horizon: { ...base().horizon, timeZone: 'Mars/Olympus_Mons' } })).toEqual(['/horizon/timeZone']);
    expect(pointers({ ...base(), horizon: { ...base().horizon, timeZone: 'Etc/GMT-1' } })).toEqual([]);
  });

  it('checks the initial output against the unit and its state', () => {
    expect(pointers({ ...base(), units: [gen({ initial: { on: false, powerKw: 30 } })] })).toEqual(['/units/0/initial/powerKw']);
    expect(pointers({ ...base(), units: [gen({ initial: { on: true, powerKw: 10 } })] })).toEqual(['/units/0/initial/powerKw']);
    expect(pointers({ ...base(), units: [gen({ initial: { on: true, powerKw: 120 } })] })).toEqual(['/units/0/initial/powerKw']);
  });

  it('checks store levels, demand lengths and reserve lengths', () => {
    expect(pointers({ ...base(), stores: [{ id: 's', capacity: 10, min: 20, initial: 5 }] })).toEqual(['/stores/0/min', '/stores/0/initial']);
    expect(pointers({ ...base(), stores: [{ id: 's', capacity: 10, initial: 5, final: 11 }] })).toEqual(['/stores/0/final']);
    expect(pointers({ ...base(), stores: [{ id: 's', capacity: 10, initial: 5, demandPerHour: [1, 2] }] })).toEqual(['/stores/0/demandPerHour']);
    expect(pointers({ ...base(), reserve: { upKw: [1, 2] } })).toEqual(['/reserve/upKw']);
    expect(pointers({ ...base(), stores: [{ id: 's', capacity: 10, initial: 5, lossPerHour: 1.5 }] })).toEqual(['/stores/0/lossPerHour']);
  });

  it('keeps ids unique across units, storage and stores', () => {
    const errors = errorsOf({ ...base(), units: [gen({ id: 'x' })], stores: [{ id: 'x', capacity: 1, initial: 0 }] });
    expect(errors).toEqual([expect.objectContaining({ pointer: '/stores/0/id', message: expect.stringMatching(/unique across units, storage and stores/) })]);
  });

  it('checks demand-charge windows: local times, weekdays, unique ids', () => {
    const charge = (window: object, id = 'c') => ({ id, pricePerKw: 1, window });
    const specWith = (...charges: object[]) => ({ ...base(), grid: { importLimitKw: 10, demandCharges: charges } });
    expect(pointers(specWith(charge({ from: '25:00' })))).toEqual(['/grid/demandCharges/0/window/from']);
    expect(pointers(specWith(charge({ from: '24:00' })))).toEqual(['/grid/demandCharges/0/window/from']);
    expect(pointers(specWith(charge({ to: '24:00' })))).toEqual([]);
    expect(pointers(specWith(charge({ daysOfWeek: [0] })))).toEqual(['/grid/demandCharges/0/window/daysOfWeek/0']);
    expect(pointers(specWith(charge({ daysOfWeek: [1, 1] })))).toEqual(['/grid/demandCharges/0/window/daysOfWeek']);
    expect(pointers(specWith(charge({}), charge({}, 'c')))).toEqual(['/grid/demandCharges/1/id']);
  });

  it('keeps every v1 spec valid: a number startupCost and costPerKwh still work', () => {
    expect(pointers({ ...base(), units: [gen({ costPerKwh: 0.3, startupCost: 12 })] })).toEqual([]);
  });
});

describe('site spec v1.1 resolution', () => {
  const resolved = (input: unknown) => {
    const r = validateSiteSpec(input);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    return resolveDefaults(r.spec);
  };

  it('turns curves, start costs and store links into the engine input', () => {
    const s = resolved({
      ...base(),
      units: [gen({ costCurve: [{ upToKw: 60, costPerKwh: 0.2 }, { upToKw: 100, costPerKwh: 0.25 }], startupCost: { hot: 10, cold: 30, coldAfterSteps: 4 }, consumes: { store: 'tank', perKwh: 0.27 } })],
      stores: [{ id: 'tank', capacity: 800, initial: 400 }],
    });
    expect(s.units[0]).toMatchObject({
      curve: [{ upToKw: 60, perKwh: 0.2 }, { upToKw: 100, perKwh: 0.25 }],
      startupCost: { hot: 10, cold: 30, coldAfterSteps: 4 },
      consumes: { store: 0, perKwh: 0.27 },
      produces: null,
      providesReserve: true,
    });
    // No initial state: off forever, which for a cold start means more than coldAfterSteps steps off (SPEC §5).
    expect(s.units[0].initial).toEqual({ on: false, stepsInState: 5, powerKw: null });
    expect(s.stores[0]).toEqual({
      id: 'tank', product: null, unit: null, capacity: 800, min: 0, initial: 400, final: null, demandPerHour: [0, 0, 0], inflowPerHour: [0, 0, 0], lossPerHour: 0,
      shortfallPenaltyPerUnit: null, spillAllowed: false,
    });
  });

  it('defaults reserve by kind: generators and batteries provide it, flexible loads do not', () => {
    const s = resolved({ ...base(), units: [gen(), flex()], storage: [{ id: 'b', capacityKwh: 10, maxChargeKw: 5, maxDischargeKw: 5, initialSocKwh: 2 }] });
    expect(s.units.map((u) => u.providesReserve)).toEqual([true, false]);
    expect(s.storage[0].providesReserve).toBe(true);
  });

  it('fills a demand-charge window: every day, the whole day, no existing peak', () => {
    const s = resolved({ ...base(), grid: { importLimitKw: 10, demandCharges: [{ id: 'c', pricePerKw: 3 }] } });
    expect(s.grid.demandCharges).toEqual([{ id: 'c', pricePerKw: 3, existingPeakKw: 0, window: { daysOfWeek: [1, 2, 3, 4, 5, 6, 7], from: '00:00', to: '24:00' } }]);
    expect(s.horizon.timeZone).toBeNull();
  });
});
