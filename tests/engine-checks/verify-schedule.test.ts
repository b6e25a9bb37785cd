/**
 * The independent verifier against hand-built schedules. Each schedule below is worked out by
 * hand from SPEC.md §2 (the arithmetic is written beside it); every mutation breaks exactly one
 * rule, and the test asserts that rule — and only that rule — is reported, with its step and
 * spec pointer.
 */
import { describe, expect, it } from 'vitest';
import { resolveDefaults, validateSiteSpec, type ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { Schedule } from '@gridwright/shared/run-result';
import { MAX_REPORTED_VIOLATIONS, verifySchedule } from '../../api/src/engine/verify-schedule';
import { findRunViolations } from '../../api/src/engine/verify-unit-runs';

/**
 * Four hourly steps (Δh = 1), a generator g1, a flexible load f1 and a battery b
 * (ηc 0.9, ηd 0.8, SOC 50 → final ≥ 40, min 10, capacity 100).
 */
function baseSpec(): ResolvedSiteSpec {
  const v = validateSiteSpec({
    horizon: { start: '2027-01-01T00:00:00+01:00', stepMinutes: 60, steps: 4 },
    supply: { availableKw: [120, 50, 0, 80] },
    siteLoad: { kw: [30, 30, 30, 40], unservedPenaltyPerKwh: 10 },
    grid: { importLimitKw: 100, exportLimitKw: 100, importPrice: 0.2, exportPrice: 0.05 },
    units: [
      { id: 'g1', kind: 'generator', ratingKw: 60, minStableKw: 20, costPerKwh: 0.3, startupCost: 5, minUpSteps: 2, minDownSteps: 2 },
      { id: 'f1', kind: 'flexible-load', ratingKw: 70, minStableKw: 10, valuePerKwh: 0.1, startupCost: 1 },
    ],
    storage: [
      { id: 'b', capacityKwh: 100, maxChargeKw: 40, maxDischargeKw: 40, chargeEfficiency: 0.9, dischargeEfficiency: 0.8,
        minSocKwh: 10, initialSocKwh: 50, finalSocKwh: 40, cycleCostPerKwh: 0.01 },
    ],
  });
  if (!v.ok) throw new Error(JSON.stringify(v.errors));
  return resolveDefaults(v.spec);
}

/**
 * A feasible schedule, balance per step (sources = sinks):
 *   t0: supply 100 (20 curtailed)           = load 30 + f1 50 + charge 20      SOC 50 + 0.9·20 = 68
 *   t1: supply 50 + g1 20 (start)           = load 30 + export 40             SOC 68
 *   t2: g1 40 + discharge 16                = load 30 + f1 10 (start) + export 16   SOC 68 − 16/0.8 = 48
 *   t3: supply 80 + unserved 10             = load 40 + f1 50                 SOC 48 ≥ final 40
 * g1 runs 2 steps (= minUpSteps) and stays off to the end (the horizon cuts the off run).
 * Objective: f1 0.1·110 = 11, g1 −0.3·60 = −18, export 0.05·56 = 2.8, cycling −0.01·16 = −0.16,
 * unserved −10·10 = −100, starts −(5 + 2·1) = −7  ⇒  −111.36.
 */
function baseSchedule(): Schedule {
  return {
    timestamps: ['2027-01-01T00:00:00+01:00', '2027-01-01T01:00:00+01:00', '2027-01-01T02:00:00+01:00', '2027-01-01T03:00:00+01:00'],
    supplyUsedKw: [100, 50, 0, 80],
    curtailedKw: [20, 0, 0, 0],
    unservedKw: [0, 0, 0, 10],
    grid: { importKw: [0, 0, 0, 0], exportKw: [0, 40, 16, 0] },
    units: {
      g1: { on: [0, 1, 1, 0], powerKw: [0, 20, 40, 0] },
      f1: { on: [1, 0, 1, 1], powerKw: [50, 0, 10, 50] },
    },
    storage: { b: { chargeKw: [20, 0, 0, 0], dischargeKw: [0, 0, 16, 0], socKwh: [68, 68, 48, 48] } },
    stores: {},
    reserve: null,
    marginalValues: { energyPerKwh: [null, null, null, null], stores: {} },
  };
}

function codes(spec: ResolvedSiteSpec, schedule: Schedule) {
  return verifySchedule(spec, schedule).violations.map((v) => v.code).sort();
}

describe('verifySchedule: a correct schedule', () => {
  it('passes and recomputes the hand-computed objective', () => {
    const r = verifySchedule(baseSpec(), baseSchedule());
    expect(r.violations).toEqual([]);
    expect(r.ok).toBe(true);
    expect(r.objective).toBeCloseTo(-111.36, 9);
  });

  it('accepts solver round-off within the documented tolerance', () => {
    const s = baseSchedule();
    s.supplyUsedKw[0] += 1e-8;
    s.storage.b.socKwh[1] -= 1e-8;
    s.units.g1.powerKw[1] -= 1e-9;
    expect(verifySchedule(baseSpec(), s).ok).toBe(true);
  });

  it('scales its tolerance with the site: 0.01 kWh of SOC error fails at 48 kWh, passes at 48 000 kWh', () => {
    const spec = baseSpec();
    const s = baseSchedule();
    const off = baseSchedule();
    off.storage.b.socKwh[2] += 0.01;
    off.storage.b.socKwh[3] += 0.01;
    expect(codes(spec, off)).toEqual(['soc-dynamics']);
    const k = 1000;
    const big = structuredClone(spec);
    big.supply.availableKw = spec.supply.availableKw.map((x) => x * k);
    big.siteLoad.kw = spec.siteLoad.kw.map((x) => x * k);
    big.grid.importLimitKw *= k;
    big.grid.exportLimitKw *= k;
    for (const u of big.units) { u.ratingKw *= k; u.minStableKw *= k; }
    for (const b of big.storage) {
      b.capacityKwh *= k; b.maxChargeKw *= k; b.maxDischargeKw *= k; b.minSocKwh *= k; b.initialSocKwh *= k;
      b.finalSocKwh = (b.finalSocKwh ?? 0) * k;
    }
    const scaled = structuredClone(s);
    const mul = (a: number[]) => a.map((x) => x * k);
    scaled.supplyUsedKw = mul(s.supplyUsedKw);
    scaled.curtailedKw = mul(s.curtailedKw);
    scaled.unservedKw = mul(s.unservedKw);
    scaled.grid = { importKw: mul(s.grid.importKw), exportKw: mul(s.grid.exportKw) };
    for (const id of Object.keys(s.units)) scaled.units[id].powerKw = mul(s.units[id].powerKw);
    const b = s.storage.b;
    scaled.storage.b = { chargeKw: mul(b.chargeKw), dischargeKw: mul(b.dischargeKw), socKwh: mul(b.socKwh) };
    scaled.storage.b.socKwh[2] += 0.01;
    scaled.storage.b.socKwh[3] += 0.01;
    expect(verifySchedule(big, scaled).violations).toEqual([]);
  });
});

describe('verifySchedule: each broken rule is caught', () => {
  it('power balance', () => {
    const s = baseSchedule();
    s.supplyUsedKw[0] = 99;
    s.curtailedKw[0] = 21;
    const r = verifySchedule(baseSpec(), s);
    expect(r.violations).toEqual([expect.objectContaining({ code: 'balance', step: 0, pointer: '/supply/availableKw/0' })]);
    expect(r.ok).toBe(false);
  });

  it('supply used above the available power', () => {
    const s = baseSchedule();
    s.supplyUsedKw[1] = 60;
    s.curtailedKw[1] = -10;
    s.grid.exportKw[1] = 50;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'supply-bounds', step: 1, pointer: '/supply/availableKw/1' }),
    ]);
  });

  it('negative supply used', () => {
    const s = baseSchedule();
    s.supplyUsedKw[2] = -1;
    s.curtailedKw[2] = 1;
    s.grid.exportKw[2] = 15;
    expect(codes(baseSpec(), s)).toEqual(['supply-bounds']);
  });

  it('curtailment that is not available − used', () => {
    const s = baseSchedule();
    s.curtailedKw[0] = 0;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([expect.objectContaining({ code: 'curtailment', step: 0 })]);
  });

  it('unserved load above the load', () => {
    const s = baseSchedule();
    s.unservedKw[3] = 45;
    s.supplyUsedKw[3] = 75;
    s.curtailedKw[3] = 5;
    s.grid.exportKw[3] = 30;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'unserved-bounds', step: 3, pointer: '/siteLoad/kw/3' }),
    ]);
  });

  it('unserved load when the load is hard', () => {
    const spec = baseSpec();
    spec.siteLoad.unservedPenaltyPerKwh = null;
    expect(verifySchedule(spec, baseSchedule()).violations).toEqual([
      expect.objectContaining({ code: 'unserved-hard', step: 3, pointer: '/siteLoad/kw/3' }),
    ]);
  });

  it('export above the export limit', () => {
    const spec = baseSpec();
    spec.grid.exportLimitKw = 30;
    expect(verifySchedule(spec, baseSchedule()).violations).toEqual([
      expect.objectContaining({ code: 'export-limit', step: 1, pointer: '/grid/exportLimitKw' }),
    ]);
  });

  it('import above the import limit', () => {
    const spec = baseSpec();
    spec.grid.importLimitKw = 5;
    const s = baseSchedule();
    s.unservedKw[3] = 0;
    s.grid.importKw[3] = 10;
    expect(verifySchedule(spec, s).violations).toEqual([
      expect.objectContaining({ code: 'import-limit', step: 3, pointer: '/grid/importLimitKw' }),
    ]);
  });

  it('grid flow on an island', () => {
    const spec = baseSpec();
    spec.grid = { island: true, importLimitKw: 0, exportLimitKw: 0, importPrice: [0, 0, 0, 0], exportPrice: [0, 0, 0, 0], demandCharges: [] };
    const r = verifySchedule(spec, baseSchedule());
    expect(r.violations.map((v) => [v.code, v.step])).toEqual([['export-limit', 1], ['export-limit', 2]]);
    expect(r.violations[0].message).toMatch(/island/);
  });

  it('import and export in the same step', () => {
    const s = baseSchedule();
    s.grid.importKw[1] = 10;
    s.grid.exportKw[1] = 50;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'grid-exclusive', step: 1, pointer: '/grid' }),
    ]);
  });

  it('an on-state that is not 0 or 1', () => {
    const s = baseSchedule();
    s.units.f1.on[0] = 0.5;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'unit-on-binary', step: 0, pointer: '/units/1' }),
    ]);
  });

  it('a unit running below its minimum stable power', () => {
    const s = baseSchedule();
    s.units.g1.powerKw[1] = 10;
    s.grid.exportKw[1] = 30;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'unit-power-bounds', step: 1, pointer: '/units/0/minStableKw' }),
    ]);
  });

  it('a unit above its rating', () => {
    const s = baseSchedule();
    s.units.f1.powerKw[0] = 80;
    s.supplyUsedKw[0] = 120;
    s.curtailedKw[0] = 0;
    s.grid.importKw[0] = 10;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'unit-power-bounds', step: 0, pointer: '/units/1/ratingKw' }),
    ]);
  });

  it('power from a unit that is off', () => {
    const s = baseSchedule();
    s.units.f1.powerKw[1] = 5;
    s.grid.exportKw[1] = 35;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'unit-power-bounds', step: 1, pointer: '/units/1/ratingKw' }),
    ]);
  });

  it('minimum up time', () => {
    const spec = baseSpec();
    spec.units[0].minUpSteps = 3;
    expect(verifySchedule(spec, baseSchedule()).violations).toEqual([
      expect.objectContaining({ code: 'min-up', step: 3, pointer: '/units/0/minUpSteps' }),
    ]);
  });

  it('minimum down time', () => {
    const spec = baseSpec();
    spec.units[1].minDownSteps = 2;
    spec.units[1].initial.stepsInState = 10;
    expect(verifySchedule(spec, baseSchedule()).violations).toEqual([
      expect.objectContaining({ code: 'min-down', step: 2, pointer: '/units/1/minDownSteps' }),
    ]);
  });

  it('minimum up time carried over from the initial state', () => {
    // On for 1 step before the horizon with minUpSteps 2: it must stay on through step 0.
    const spec = baseSpec();
    spec.units[0].initial = { on: true, stepsInState: 1, powerKw: null };
    spec.units[0].minDownSteps = 1;
    expect(verifySchedule(spec, baseSchedule()).violations).toEqual([
      expect.objectContaining({ code: 'min-up', step: 0, pointer: '/units/0/initial' }),
    ]);
  });

  it('counts no start at step 0 for a unit that was already on', () => {
    const spec = baseSpec();
    spec.units[1].initial = { on: true, stepsInState: 5, powerKw: null };
    const r = verifySchedule(spec, baseSchedule());
    expect(r.ok).toBe(true);
    expect(r.objective).toBeCloseTo(-111.36 + 1, 9);
  });

  it('minimum down time carried over from the initial state', () => {
    const spec = baseSpec();
    spec.units[1].initial = { on: false, stepsInState: 1, powerKw: null };
    spec.units[1].minDownSteps = 2;
    expect(verifySchedule(spec, baseSchedule()).violations).toEqual([
      expect.objectContaining({ code: 'min-down', step: 0, pointer: '/units/1/initial' }),
      expect.objectContaining({ code: 'min-down', step: 2, pointer: '/units/1/minDownSteps' }),
    ]);
  });

  it('lets a run that reaches the horizon end be shorter than its minimum', () => {
    // g1's off run at step 3 (1 step, minDownSteps 2) and f1's on run at steps 2–3 (2 steps,
    // minUpSteps 3) reach the horizon's end, so they may be short; f1's lone step 0 may not.
    const spec = baseSpec();
    spec.units[1].minUpSteps = 3;
    spec.units[1].minDownSteps = 1;
    const s = baseSchedule();
    expect(verifySchedule(spec, s).violations).toEqual([
      expect.objectContaining({ code: 'min-up', step: 1, pointer: '/units/1/minUpSteps' }),
    ]);
  });

  it('SOC that does not follow the charge and discharge', () => {
    const s = baseSchedule();
    s.storage.b.socKwh[0] = 70;
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'soc-dynamics', step: 0, pointer: '/storage/0/initialSocKwh' }),
      expect.objectContaining({ code: 'soc-dynamics', step: 1, pointer: '/storage/0' }),
    ]);
  });

  it('efficiencies are applied the right way round (charge ×ηc, discharge ÷ηd)', () => {
    const s = baseSchedule();
    // Someone multiplying the discharge by ηd would book 68 − 0.8·16 = 55.2 at step 2.
    s.storage.b.socKwh = [68, 68, 55.2, 55.2];
    expect(codes(baseSpec(), s)).toEqual(['soc-dynamics']);
  });

  it('SOC below the minimum and above the capacity', () => {
    const low = baseSpec();
    low.storage[0].minSocKwh = 49;
    low.storage[0].finalSocKwh = null;
    expect(verifySchedule(low, baseSchedule()).violations.map((v) => [v.code, v.step, v.pointer])).toEqual([
      ['soc-bounds', 2, '/storage/0/minSocKwh'],
      ['soc-bounds', 3, '/storage/0/minSocKwh'],
    ]);
    const small = baseSpec();
    small.storage[0].capacityKwh = 60;
    expect(verifySchedule(small, baseSchedule()).violations.map((v) => [v.code, v.step, v.pointer])).toEqual([
      ['soc-bounds', 0, '/storage/0/capacityKwh'],
      ['soc-bounds', 1, '/storage/0/capacityKwh'],
    ]);
  });

  it('charge and discharge above their limits', () => {
    const spec = baseSpec();
    spec.storage[0].maxChargeKw = 15;
    spec.storage[0].maxDischargeKw = 10;
    expect(verifySchedule(spec, baseSchedule()).violations.map((v) => [v.code, v.step, v.pointer])).toEqual([
      ['charge-bounds', 0, '/storage/0/maxChargeKw'],
      ['discharge-bounds', 2, '/storage/0/maxDischargeKw'],
    ]);
  });

  it('charging and discharging in the same step', () => {
    const s = baseSchedule();
    // t1: charge 10, discharge 8 → SOC 68 + 9 − 10 = 67; net −2 kW taken from the export.
    s.storage.b.chargeKw[1] = 10;
    s.storage.b.dischargeKw[1] = 8;
    s.grid.exportKw[1] = 38;
    s.storage.b.socKwh = [68, 67, 47, 47];
    expect(verifySchedule(baseSpec(), s).violations).toEqual([
      expect.objectContaining({ code: 'storage-exclusive', step: 1, pointer: '/storage/0' }),
    ]);
  });

  it('final SOC below its target', () => {
    const spec = baseSpec();
    spec.storage[0].finalSocKwh = 60;
    expect(verifySchedule(spec, baseSchedule()).violations).toEqual([
      expect.objectContaining({ code: 'final-soc', step: 3, pointer: '/storage/0/finalSocKwh' }),
    ]);
  });

  it('series of the wrong length, missing assets, non-numbers, wrong timestamps', () => {
    const short = baseSchedule();
    short.supplyUsedKw.pop();
    expect(codes(baseSpec(), short)).toEqual(['length']);

    const noUnit = baseSchedule();
    delete (noUnit.units as Record<string, unknown>).g1;
    expect(verifySchedule(baseSpec(), noUnit).violations).toEqual([
      expect.objectContaining({ code: 'missing-series', pointer: '/units/0/id' }),
    ]);

    const noBattery = baseSchedule();
    noBattery.storage = {};
    expect(codes(baseSpec(), noBattery)).toEqual(['missing-series']);

    const nan = baseSchedule();
    nan.units.f1.powerKw[2] = Number.NaN;
    expect(verifySchedule(baseSpec(), nan).violations).toEqual([expect.objectContaining({ code: 'non-finite', step: 2 })]);

    const late = baseSchedule();
    late.timestamps[2] = '2027-01-01T02:15:00+01:00';
    expect(verifySchedule(baseSpec(), late).violations).toEqual([
      expect.objectContaining({ code: 'timestamp', step: 2, pointer: '/horizon/start' }),
    ]);
    // The same instants written in UTC are the same steps.
    const utc = baseSchedule();
    utc.timestamps = ['2026-12-31T23:00:00Z', '2027-01-01T00:00:00Z', '2027-01-01T01:00:00Z', '2027-01-01T02:00:00Z'];
    expect(verifySchedule(baseSpec(), utc).ok).toBe(true);
  });

  it('caps the list on a schedule broken everywhere', () => {
    const T = 500;
    const v = validateSiteSpec({
      horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 15, steps: T },
      supply: { availableKw: new Array(T).fill(10) },
    });
    if (!v.ok) throw new Error('invalid');
    const spec = resolveDefaults(v.spec);
    const zeros = new Array(T).fill(0);
    const r = verifySchedule(spec, {
      timestamps: Array.from({ length: T }, (_, t) => new Date(Date.parse('2027-01-01T00:00:00Z') + t * 900_000).toISOString()),
      supplyUsedKw: new Array(T).fill(10),
      curtailedKw: zeros,
      unservedKw: zeros,
      grid: { importKw: zeros, exportKw: zeros },
      units: {},
      storage: {},
      stores: {},
      reserve: null,
      marginalValues: { energyPerKwh: zeros, stores: {} },
    });
    expect(r.violations).toHaveLength(MAX_REPORTED_VIOLATIONS + 1);
    expect(r.violations.at(-1)).toEqual({ code: 'more-violations', message: `${T - MAX_REPORTED_VIOLATIONS} further violations not listed` });
  });
});

describe('findRunViolations (minimum up/down on the on/off sequence)', () => {
  // The reference rule of SPEC.md §2, applied by hand to each sequence.
  it('counts the initial state and cuts runs at the horizon end', () => {
    expect(findRunViolations([1, 1, 0, 0, 1], false, 5, 2, 2)).toEqual([]);
    expect(findRunViolations([1, 0, 1], false, 5, 2, 1)).toEqual([
      { kind: 'min-up', fromStep: 0, changedAt: 1, length: 1, required: 2, initial: false },
    ]);
    // On for 2 steps before the horizon with minUp 3: one more step is owed.
    expect(findRunViolations([0, 0], true, 2, 3, 1)).toEqual([
      { kind: 'min-up', fromStep: 0, changedAt: 0, length: 2, required: 3, initial: true },
    ]);
    expect(findRunViolations([1, 0, 0], true, 2, 3, 1)).toEqual([]);
    expect(findRunViolations([1, 1, 1, 0, 1, 1], false, 5, 3, 2)).toEqual([
      { kind: 'min-down', fromStep: 3, changedAt: 4, length: 1, required: 2, initial: false },
    ]);
    expect(findRunViolations([0, 0, 0, 1], false, 6, 6, 6)).toEqual([]);
  });
});
