import { describe, expect, it } from 'vitest';
import { combinationCount, parseValues, suggestPointers, valueLabel } from './grid-form';

describe('the study grid editor', () => {
  it('suggests scalars and short number lists, never a long per-step series', () => {
    const spec = {
      horizon: { start: 'x', stepMinutes: 60, steps: 3 },
      supply: { availableKw: new Array(96).fill(1) },
      grid: { importPrice: [0.2, 0.3, 0.2] },
      storage: [{ id: 'bess/1', capacityKwh: 200, chargeFromSupplyOnly: false }],
    };
    expect(suggestPointers(spec)).toEqual([
      '/horizon/stepMinutes',
      '/horizon/steps',
      '/grid/importPrice',
      '/storage/0/capacityKwh',
      '/storage/0/chargeFromSupplyOnly',
    ]);
  });

  it('reads one JSON value per line and names the line that is not one', () => {
    expect(parseValues('200\n\n400\n[0.2, 0.3]\n"x"')).toEqual({ ok: true, values: [200, 400, [0.2, 0.3], 'x'] });
    expect(parseValues('200\nfour hundred')).toMatchObject({ ok: false, line: 2 });
  });

  it('counts the combinations as the product of the value lists', () => {
    expect(combinationCount([{ pointer: '/a', label: '', valuesText: '1\n2' }, { pointer: '/b', label: '', valuesText: '1\n2\n3' }])).toBe(6);
    expect(combinationCount([{ pointer: '/a', label: '', valuesText: '' }])).toBe(0);
    expect(valueLabel([0.21, 0.22, 0.23, 0.24, 0.25, 0.26])).toBe('[0.21,0.22,0.23,0.24,0.…');
  });
});
