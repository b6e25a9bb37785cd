/**
 * Tolerances of the independent schedule verifier.
 *
 * A schedule comes from a floating-point solver whose feasibility tolerance (about 1e-7 in the
 * solver's own scaled units) turns into an error proportional to the size of the numbers in the
 * spec, so a fixed absolute tolerance is either too strict for a 50 MW site or too lax for a
 * 5 kW one. Every comparison therefore allows
 *
 *   REL_TOL · max(1, |the magnitudes in that comparison|)  +  ABS_TOL_PER_SCALE · siteScale
 *
 * where siteScale is the largest power (kW) or energy (kWh) that appears in the spec. With
 * REL_TOL = 1e-6 a 10 000 kW rating tolerates 0.01 kW; the scale term (1e-7 of the largest
 * figure) covers small values that the solver computed next to large ones in the same row.
 * On/off values are compared exactly: the engine rounds them to 0/1 before returning.
 */
export const REL_TOL = 1e-6;
export const ABS_TOL_PER_SCALE = 1e-7;

export class Tolerance {
  private readonly absolute: number;

  constructor(siteScale: number) {
    this.absolute = ABS_TOL_PER_SCALE * Math.max(1, siteScale);
  }

  /** The allowed error when comparing quantities of the given magnitudes. */
  of(...magnitudes: number[]): number {
    let m = 1;
    for (const x of magnitudes) m = Math.max(m, Math.abs(x));
    return REL_TOL * m + this.absolute;
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
