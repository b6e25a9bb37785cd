import type { ModelReport } from '@gridwright/shared/run-result';
import type { ModelArrays } from './model-arrays';

export type CoefficientRanges = ModelReport['coefficientRange'];

class Span {
  lo = Infinity;
  hi = 0;
  add(v: number): void {
    const a = Math.abs(v);
    if (a === 0 || a === Infinity || Number.isNaN(a)) return;
    if (a < this.lo) this.lo = a;
    if (a > this.hi) this.hi = a;
  }
  addAll(values: ArrayLike<number>): void {
    for (let i = 0; i < values.length; i++) this.add(values[i]);
  }
  get(): [number, number] | null {
    return this.hi > 0 ? [this.lo, this.hi] : null;
  }
}

/** The smallest and largest non-zero magnitudes, as HiGHS prints them in its log. */
export function coefficientRanges(m: ModelArrays): CoefficientRanges {
  const matrix = new Span();
  matrix.addAll(m.values);
  const objective = new Span();
  objective.addAll(m.colCost);
  const bounds = new Span();
  bounds.addAll(m.colLower);
  bounds.addAll(m.colUpper);
  const rhs = new Span();
  rhs.addAll(m.rowLower);
  rhs.addAll(m.rowUpper);
  return { matrix: matrix.get(), objective: objective.get(), bounds: bounds.get(), rhs: rhs.get() };
}

export function mergeRanges(a: CoefficientRanges | null, b: CoefficientRanges): CoefficientRanges {
  if (!a) return b;
  const merge = (x: [number, number] | null, y: [number, number] | null): [number, number] | null =>
    !x ? y : !y ? x : [Math.min(x[0], y[0]), Math.max(x[1], y[1])];
  return {
    matrix: merge(a.matrix, b.matrix),
    objective: merge(a.objective, b.objective),
    bounds: merge(a.bounds, b.bounds),
    rhs: merge(a.rhs, b.rhs),
  };
}
