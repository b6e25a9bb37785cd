import { describe, expect, it } from 'vitest';
import { objectiveTermBars } from './objective-term-bars';

// The island demo's terms as the engine reported them; SPEC §5: they sum to objective.value.
const terms = { energy: -1840.04, noLoad: -514, starts: -68, demandCharges: 0, penalties: 0, cycleCost: -9.24 };

describe('objectiveTermBars', () => {
  it('keeps the order and signs of SPEC §5, costs negative, then the objective', () => {
    const bars = objectiveTermBars(terms, -2431.28);
    expect(bars.map((b) => [b.key, b.value, b.sign])).toEqual([
      ['energy', -1840.04, 'cost'],
      ['noLoad', -514, 'cost'],
      ['starts', -68, 'cost'],
      ['demandCharges', 0, 'cost'],
      ['penalties', 0, 'cost'],
      ['cycleCost', -9.24, 'cost'],
      ['objective', -2431.28, 'total'],
    ]);
  });

  it('shows value earned as positive', () => {
    expect(objectiveTermBars({ ...terms, energy: 3725.5 }, 3134.26)[0]).toMatchObject({ value: 3725.5, sign: 'value' });
  });

  it('sums the terms when the objective is not known', () => {
    // −1840.04 − 514 − 68 − 9.24 = −2431.28
    expect(objectiveTermBars(terms, null).at(-1)!.value).toBeCloseTo(-2431.28, 9);
  });
});
