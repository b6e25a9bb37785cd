import { VERIFY_ABSOLUTE_TOLERANCE_PER_SCALE, VERIFY_RELATIVE_TOLERANCE } from './numerics';

/**
 * The independent verifier's comparisons: relative to the magnitudes compared, plus a term for
 * the site's scale (numerics.ts explains both). On/off values are compared exactly: the engine
 * rounds them to 0/1 before returning.
 */
export class Tolerance {
  private readonly absolute: number;

  constructor(siteScale: number) {
    this.absolute = VERIFY_ABSOLUTE_TOLERANCE_PER_SCALE * Math.max(1, siteScale);
  }

  /** The allowed error when comparing quantities of the given magnitudes. */
  of(...magnitudes: number[]): number {
    let m = 1;
    for (const x of magnitudes) m = Math.max(m, Math.abs(x));
    return VERIFY_RELATIVE_TOLERANCE * m + this.absolute;
  }

  /** a ≤ b within tolerance. */
  le(a: number, b: number): boolean {
    return a <= b + this.of(a, b);
  }

  /** |a − b| within tolerance. */
  eq(a: number, b: number): boolean {
    return Math.abs(a - b) <= this.of(a, b);
  }

  /** x counts as non-zero (used for the exclusivity checks). */
  positive(x: number, magnitude: number): boolean {
    return x > this.of(magnitude);
  }
}
