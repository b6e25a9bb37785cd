import { describe, expect, it } from 'vitest';
import { exampleSites } from '@gridwright/shared/examples';
import { unitCurves } from './unit-curves';

describe('unitCurves', () => {
  it("draws a generator's cost curve as steps from 0 kW to the end of its last slice (SPEC §5)", () => {
    // The island demo's gen-a: 0.26 money/kWh up to 150 kW, 0.29 from there to its 250 kW rating.
    const island = exampleSites.find((e) => e.id === 'island-microgrid')!.spec;
    const genA = unitCurves(island).find((c) => c.id === 'gen-a')!;
    expect(genA).toMatchObject({ kind: 'generator', ratingKw: 250, minStableKw: 90, noLoadCostPerHour: 14, source: 'curve', breaksShapeAt: null, endsAtKw: 250 });
    expect(genA.points).toEqual([
      { kw: 0, price: 0.26 },
      { kw: 150, price: 0.29 },
      { kw: 250, price: 0.29 },
    ]);
  });

  it('draws a unit with one price, or none, as a flat line over its rating', () => {
    const curves = unitCurves({
      units: [
        { id: 'gen-c', kind: 'generator', ratingKw: 80, costPerKwh: 0.34 },
        { id: 'pump', kind: 'flexible-load', ratingKw: 45 },
      ],
    });
    expect(curves.map((c) => [c.id, c.source, c.points])).toEqual([
      ['gen-c', 'single', [{ kw: 0, price: 0.34 }, { kw: 80, price: 0.34 }]],
      ['pump', 'single', [{ kw: 0, price: 0 }, { kw: 45, price: 0 }]],
    ]);
  });

  it('names the first slice that breaks the shape: a cheaper generator slice, a dearer flexible-load slice', () => {
    const [gen, load, concave] = unitCurves({
      units: [
        { id: 'g', kind: 'generator', ratingKw: 300, costCurve: [{ upToKw: 100, costPerKwh: 0.3 }, { upToKw: 200, costPerKwh: 0.32 }, { upToKw: 300, costPerKwh: 0.31 }] },
        { id: 'l', kind: 'flexible-load', ratingKw: 500, valueCurve: [{ upToKw: 300, valuePerKwh: 0.07 }, { upToKw: 500, valuePerKwh: 0.1 }] },
        { id: 'c', kind: 'flexible-load', ratingKw: 500, valueCurve: [{ upToKw: 300, valuePerKwh: 0.1 }, { upToKw: 500, valuePerKwh: 0.07 }] },
      ],
    });
    expect(gen.breaksShapeAt).toBe(3);
    expect(load.breaksShapeAt).toBe(2);
    expect(concave.breaksShapeAt).toBeNull();
  });

  it('reports where the last slice ends, so a curve short of the rating shows', () => {
    const [c] = unitCurves({ units: [{ id: 'g', kind: 'generator', ratingKw: 455, costCurve: [{ upToKw: 250, costPerKwh: 16.3 }, { upToKw: 400, costPerKwh: 16.6 }] }] });
    expect(c.endsAtKw).toBe(400);
  });

  it('follows a spec that is still being typed: half-written units and slices are left out, not fatal', () => {
    const curves = unitCurves({
      units: [
        { id: 'g', kind: 'generator', ratingKw: 100, costCurve: [{ upToKw: 50, costPerKwh: 0.2 }, { upToKw: 100 }] },
        { id: 'half', kind: 'generator' },
        'not a unit',
        { kind: 'flexible-load', ratingKw: 10, valuePerKwh: 0.1 },
      ],
    });
    expect(curves.map((c) => c.id)).toEqual(['g', 'unit 4']);
    expect(curves[0].points).toEqual([{ kw: 0, price: 0.2 }, { kw: 50, price: 0.2 }]);
    expect(unitCurves(undefined)).toEqual([]);
    expect(unitCurves({ units: 'none' })).toEqual([]);
  });
});
