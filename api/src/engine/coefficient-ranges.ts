import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { CoefficientSpan, ModelReport, ResultWarning, StepRange } from '@gridwright/shared/run-result';
import type { ModelArrays } from './model-arrays';
import { HEALTHY_COEFFICIENT_BAND } from './numerics';

export type CoefficientRanges = ModelReport['coefficientRange'];
export type CoefficientKind = keyof CoefficientRanges;

const KINDS: CoefficientKind[] = ['matrix', 'objective', 'bounds', 'rhs'];

class Span {
  lo = Infinity;
  hi = 0;
  addAll(values: ArrayLike<number>): this {
    for (let i = 0; i < values.length; i++) {
      const a = Math.abs(values[i]);
      if (a === 0 || a === Infinity || Number.isNaN(a)) continue;
      if (a < this.lo) this.lo = a;
      if (a > this.hi) this.hi = a;
    }
    return this;
  }
  get(): CoefficientSpan {
    return this.hi > 0 ? [this.lo, this.hi] : null;
  }
}

/** The smallest and largest finite non-zero magnitudes among `values`; null when there is none. */
export function nonZeroSpan(...values: ArrayLike<number>[]): CoefficientSpan {
  const span = new Span();
  for (const v of values) span.addAll(v);
  return span.get();
}

/** The smallest and largest non-zero magnitudes, as HiGHS prints them in its log. */
export function coefficientRanges(m: ModelArrays): CoefficientRanges {
  return {
    matrix: nonZeroSpan(m.values),
    objective: nonZeroSpan(m.colCost),
    bounds: nonZeroSpan(m.colLower, m.colUpper),
    rhs: nonZeroSpan(m.rowLower, m.rowUpper),
  };
}

const mergeSpans = (x: CoefficientSpan, y: CoefficientSpan): CoefficientSpan => (!x ? y : !y ? x : [Math.min(x[0], y[0]), Math.max(x[1], y[1])]);

export function mergeRanges(a: CoefficientRanges | null, b: CoefficientRanges): CoefficientRanges {
  if (!a) return b;
  return { matrix: mergeSpans(a.matrix, b.matrix), objective: mergeSpans(a.objective, b.objective), bounds: mergeSpans(a.bounds, b.bounds), rhs: mergeSpans(a.rhs, b.rhs) };
}

/** The kinds of coefficient whose span leaves HEALTHY_COEFFICIENT_BAND, with that span. */
export function rangesOutsideBand(ranges: CoefficientRanges): Partial<CoefficientRanges> {
  const [low, high] = HEALTHY_COEFFICIENT_BAND;
  const outside: Partial<CoefficientRanges> = {};
  for (const kind of KINDS) {
    const span = ranges[kind];
    if (span && (span[0] < low || span[1] > high)) outside[kind] = span;
  }
  return outside;
}

const LABEL: Record<CoefficientKind, string> = { matrix: 'matrix', objective: 'objective', bounds: 'bounds', rhs: 'right-hand sides' };
const fmt = (v: number) => v.toExponential(1);

/**
 * One warning for every model of a run whose coefficients left the band: the merged spans,
 * the windows (steps) they were found in, and the likeliest cause in the spec.
 */
export function coefficientRangeWarning(spec: ResolvedSiteSpec, found: { outside: Partial<CoefficientRanges>; steps: StepRange }[]): ResultWarning | null {
  if (!found.length) return null;
  const merged: Partial<CoefficientRanges> = {};
  for (const { outside } of found) for (const kind of KINDS) if (outside[kind]) merged[kind] = mergeSpans(merged[kind] ?? null, outside[kind]!);
  const kinds = KINDS.filter((k) => merged[k]);
  const spans = kinds.map((k) => `${LABEL[k]} [${fmt(merged[k]![0])}, ${fmt(merged[k]![1])}]`).join(', ');
  const { scaling, tightBigM } = spec.solver.reductions;
  const cause = !scaling
    ? { text: 'solver.reductions.scaling is off, so powers enter the model in kW and money unscaled', pointer: '/solver/reductions/scaling' }
    : kinds.length === 1 && kinds[0] === 'matrix' && !tightBigM
      ? { text: "solver.reductions.tightBigM is off, so big-M values are ten times the site's total power", pointer: '/solver/reductions/tightBigM' }
      : { text: "the spec's own figures (ratings, prices, efficiencies or series values) lie too many orders of magnitude apart for one power and one money unit to bring them all near 1", pointer: undefined };
  const [low, high] = HEALTHY_COEFFICIENT_BAND;
  return {
    code: 'coefficient-range',
    message:
      `Model coefficients leave the band [${fmt(low)}, ${fmt(high)}] in which the solver's tolerances hold: ${spans}. ` +
      `Likely cause: ${cause.text}. Every schedule is still verified against the spec, but the solver may be slower or less accurate.`,
    ...(cause.pointer ? { pointer: cause.pointer } : {}),
    steps: mergeStepRanges(found.map((f) => f.steps)),
  };
}

/** Overlapping or touching step ranges (rolling windows overlap) as disjoint ranges in step order. */
function mergeStepRanges(ranges: StepRange[]): StepRange[] {
  const sorted = ranges.slice().sort((a, b) => a.from - b.from);
  const out: StepRange[] = [];
  for (const r of sorted) {
    const last = out[out.length - 1];
    if (last && r.from <= last.to + 1) last.to = Math.max(last.to, r.to);
    else out.push({ ...r });
  }
  return out;
}
