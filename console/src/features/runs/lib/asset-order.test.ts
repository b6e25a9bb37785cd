import type { Schedule } from '@gridwright/shared/run-result';
import { describe, expect, it } from 'vitest';
import { seriesPalette } from '@/lib/chart-colors';
import { assetColors, inSpecOrder } from './asset-order';

describe('inSpecOrder', () => {
  it("puts ids in the spec's order, whatever order the stored schedule has them in", () => {
    // jsonb order: shorter keys first.
    expect(inSpecOrder(['fuel-cell', 'electrolyser'], [{ id: 'electrolyser' }, { id: 'fuel-cell' }])).toEqual(['electrolyser', 'fuel-cell']);
  });

  it('keeps ids the spec does not list after the listed ones, in their own order', () => {
    expect(inSpecOrder(['x', 'b', 'y', 'a'], [{ id: 'a' }, { id: 'b' }])).toEqual(['a', 'b', 'x', 'y']);
    expect(inSpecOrder(['b', 'a'], undefined)).toEqual(['b', 'a']);
  });
});

describe('assetColors', () => {
  it('colours units, then batteries, in spec order', () => {
    const schedule = { units: { 'gen-b': {}, 'gen-a': {} }, storage: { bess: {} } } as unknown as Schedule;
    const colors = assetColors(schedule, { units: [{ id: 'gen-a' }, { id: 'gen-b' }] as never, storage: [{ id: 'bess' }] as never });
    expect([...colors]).toEqual([
      ['gen-a', seriesPalette[0]],
      ['gen-b', seriesPalette[1]],
      ['bess', seriesPalette[2]],
    ]);
  });
});
