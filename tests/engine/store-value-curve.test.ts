import { describe, expect, it } from 'vitest';
import { storeValueCurve } from '../../api/src/engine/terminal-values';
import { resolve } from './synthetic-sites';

// How a rolling window values product it leaves in a store (terminal-values.ts), on hand-derived
// cases: a 10 kW pump making 2 m3 per kWh from grid energy, against a water demand.
function pumpSite(importPrice: number[], demandPerHour: number, extra: { shortfallPenaltyPerUnit?: number; inflowPerHour?: number[] } = {}) {
  const steps = importPrice.length;
  return resolve({
    horizon: { start: '2027-01-01T00:00:00Z', stepMinutes: 60, steps },
    supply: { availableKw: new Array(steps).fill(0) },
    siteLoad: { kw: new Array(steps).fill(0) },
    grid: { importLimitKw: 100, exportLimitKw: 0, importPrice, exportPrice: 0 },
    units: [{ id: 'pump', kind: 'flexible-load', ratingKw: 10, minStableKw: 0, produces: { store: 'tank', perKwh: 2 } }],
    stores: [{ id: 'tank', product: 'water', unit: 'm3', capacity: 1000, min: 0, initial: 500, demandPerHour: new Array(steps).fill(demandPerHour), ...extra }],
  });
}

describe('the value curve of product left at a window end', () => {
  it('credits the first units at the dearest production they save, the last at the cheapest', () => {
    // Hand derivation: 3 hours of 30 m3 demand = 90 m3 to make. Each hour the pump offers
    // 10 kWh × 2 = 20 m3 at price / 2: 0.05, 0.15, 0.10 per m3. The cheapest 60 m3 are made; the
    // other 30 m3 cannot be made in the range, and a hard demand values them at the dearest offer
    // (0.15). The first unit left saves the dearest: 30 + 20 m3 at 0.15, then 20 at 0.10, 20 at 0.05.
    const curve = storeValueCurve(pumpSite([0.1, 0.3, 0.2], 30), 0, 0, 3, 0);
    expect(curve).toEqual([
      { width: 50, value: 0.15 },
      { width: 20, value: 0.1 },
      { width: 20, value: 0.05 },
    ]);
  });

  it('caps every value at the shortfall penalty, and credits nothing beyond the net demand', () => {
    // As above with a penalty of 0.12 per m3: the 50 m3 at 0.15 are worth at most 0.12.
    const capped = storeValueCurve(pumpSite([0.1, 0.3, 0.2], 30, { shortfallPenaltyPerUnit: 0.12 }), 0, 0, 3, 0);
    expect(capped).toEqual([
      { width: 50, value: 0.12 },
      { width: 20, value: 0.1 },
      { width: 20, value: 0.05 },
    ]);
    // Inflow of 40 m3/h covers the 30 m3/h demand: nothing left at the window end saves anything.
    expect(storeValueCurve(pumpSite([0.1, 0.3, 0.2], 30, { inflowPerHour: [40, 40, 40] }), 0, 0, 3, 0)).toEqual([]);
  });

  it('merges many price tiers into a few slices, keeping the values falling and the total credit', () => {
    // Ten distinct prices 0.10…1.00, 25 m3/h of demand over 10 hours = 250 m3, offers of 20 m3 an
    // hour = 200 m3: all ten offers are used (Σ 20 × price/2 = 10 × 5.5 = 55) and the 50 m3 left
    // unmet are worth the dearest offer (0.50 each: 25), 80 in all, whatever the merging.
    const prices = [0.5, 0.1, 0.9, 0.3, 0.7, 0.2, 1.0, 0.4, 0.8, 0.6];
    const curve = storeValueCurve(pumpSite(prices, 25), 0, 0, prices.length, 0);
    expect(curve.length).toBeLessThanOrEqual(6);
    for (let i = 1; i < curve.length; i++) expect(curve[i].value).toBeLessThan(curve[i - 1].value);
    expect(curve.reduce((n, s) => n + s.width, 0)).toBeCloseTo(250, 9);
    expect(curve.reduce((n, s) => n + s.width * s.value, 0)).toBeCloseTo(80, 9);
  });
});
