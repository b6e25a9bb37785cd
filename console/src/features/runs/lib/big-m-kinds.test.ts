import { describe, expect, it } from 'vitest';
import { bigMKindCounts, classifyBigM } from './big-m-kinds';

// Place names as the engine's formulation report writes them (api/src/engine/build-window-model.ts, collectBigM).
const entries = [
  { where: 'gen-a capacity', value: 250 },
  { where: 'gen-a reserve headroom (rating)', value: 250 },
  { where: 'bess charge/discharge exclusivity (charge side)', value: 150 },
  { where: 'bess charge/discharge exclusivity (discharge side)', value: 150 },
  { where: 'grid import/export exclusivity (import side)', value: 700 },
  { where: 'monthly-peak demand-charge peak (import limit)', value: 700 },
  { where: 'something new', value: 1 },
];

describe('classifyBigM', () => {
  it('names the kind of every place the engine reports, and keeps an unknown one as other', () => {
    expect(classifyBigM(entries).map((r) => r.kind)).toEqual(['capacity', 'reserve', 'storage', 'storage', 'grid', 'demand-peak', 'other']);
  });

  it('counts the places of each kind present', () => {
    expect(bigMKindCounts(classifyBigM(entries)).map((k) => [k.id, k.count])).toEqual([
      ['capacity', 1],
      ['reserve', 1],
      ['storage', 2],
      ['grid', 1],
      ['demand-peak', 1],
      ['other', 1],
    ]);
  });
});
