import { describe, expect, it } from 'vitest';
import { parseTagMapText, tagMapToText } from './tag-map-text';

describe('tag map text', () => {
  it('reads column = tag lines and skips blanks and comments', () => {
    const text = 'ely-1.powerKw = PN.ELY1.P_SP\n\n# battery\nbess-1.socKwh=PN.BESS1.SOC\nnot a pair';
    expect(parseTagMapText(text)).toEqual({
      tagMap: { 'ely-1.powerKw': 'PN.ELY1.P_SP', 'bess-1.socKwh': 'PN.BESS1.SOC' },
      badLines: [5],
    });
  });

  it('writes the same form back', () => {
    const map = { 'a.on': 'T1', 'b.powerKw': 'T2 = x' };
    expect(parseTagMapText(tagMapToText(map)).tagMap).toEqual(map);
  });
});
