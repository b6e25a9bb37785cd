/**
 * The engine's numerical tolerances, and the band its model coefficients should stay in, each
 * named once with where it comes from.
 */

/**
 * HiGHS's `primal_feasibility_tolerance` (its default, as the `highs` package documents it), in
 * the model's internal units: how far a solution it calls feasible may miss a row or a bound.
 */
export const SOLVER_FEASIBILITY_TOLERANCE = 1e-7;

/**
 * Solver output within this of a bound is taken to be at the bound when a schedule is read
 * from a solution (internal units, so `× scale.powerKw` in kW): ten times the feasibility
 * tolerance, so every value the solver could have meant as the bound is cleaned to it.
 */
export const OUTPUT_CLEANING_TOLERANCE = 10 * SOLVER_FEASIBILITY_TOLERANCE;

/** An on/off value read from a solution is on above this (integral values sit within the integrality tolerance of 0 or 1). */
export const ON_THRESHOLD = 0.5;

/** Float noise in kW, kWh or money: what arithmetic on the spec's own figures leaves behind, never a quantity. */
export const TINY = 1e-9;

/** TINY relative to a non-negative magnitude, never below TINY itself. */
export const tinyAt = (magnitude: number) => TINY * Math.max(1, magnitude);

/** Keeps a relative gap finite when the objective is zero: |bound − value| / (this + |value|). */
export const GAP_ZERO_GUARD = 1e-10;

/**
 * The independent verifier's tolerances. A schedule comes from a floating-point solver whose
 * feasibility tolerance (SOLVER_FEASIBILITY_TOLERANCE, in the solver's scaled units) turns into
 * an error proportional to the size of the numbers in the spec, so a fixed absolute tolerance
 * is either too strict for a 50 MW site or too lax for a 5 kW one. Every comparison allows
 *
 *   VERIFY_RELATIVE_TOLERANCE · max(1, |the magnitudes compared|) + VERIFY_ABSOLUTE_TOLERANCE_PER_SCALE · siteScale
 *
 * where siteScale is the largest power (kW) or energy (kWh) in the spec: a 10 000 kW rating
 * tolerates 0.01 kW, and the scale term (1e-7 of the largest figure) covers small values the
 * solver computed next to large ones in the same row.
 */
export const VERIFY_RELATIVE_TOLERANCE = 1e-6;
export const VERIFY_ABSOLUTE_TOLERANCE_PER_SCALE = 1e-7;

/**
 * Added to each LP optimum of the horizon bound (horizon-bound.ts), relative to its magnitude
 * (at least 1 money unit): a simplex optimum is exact only to the solver's feasibility and
 * optimality tolerances (1e-7 in scaled units, SOLVER_FEASIBILITY_TOLERANCE), so a bound taken
 * at face value could sit a hair below the true optimum. Ten times the verifier's relative
 * tolerance: our choice, wide enough for every tolerance and far below any gap worth reporting.
 */
export const LP_BOUND_MARGIN = 1e-5;

/** A rolling segment meets the seam its successor starts from when each SOC agrees within this share of capacity. */
export const SEAM_SOC_TOLERANCE = 1e-6;

/** The spec's own figures of one kind (prices, ratings) further apart than this ratio get a `magnitude-spread` warning. */
export const MAGNITUDE_SPREAD_LIMIT = 1e6;

/**
 * The band every non-zero coefficient of a model should lie in, checked before each solve.
 * HiGHS advises keeping values near 1; measured on HiGHS 1.15.1 (the build we ship), its log
 * warns of "excessively small" costs and bounds below 1e-4 and "excessively large" ones above
 * 1e6, so the band is where HiGHS stays silent. The matrix is held to the same band although
 * HiGHS does not warn for it: a big-M coefficient of 1e6 lets a binary at 1e-6, which HiGHS's
 * integrality tolerance (`mip_feasibility_tolerance`, default 1e-6) counts as 0, carry a whole
 * unit of power.
 */
export const HEALTHY_COEFFICIENT_BAND: readonly [number, number] = [1e-4, 1e6];
