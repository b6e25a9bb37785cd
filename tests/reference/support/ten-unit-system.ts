/**
 * The classic 10-unit, 24-hour unit-commitment test system: S. A. Kazarlis, A. G. Bakirtzis and
 * V. Petridis, "A genetic algorithm solution to the unit commitment problem", IEEE Transactions
 * on Power Systems 11(1), 1996. Its data table and load profile are widely reproduced in the
 * unit-commitment literature; the figures below are WRITTEN FROM MEMORY of that table (facts and
 * figures carry over; the source is the paper), so a slip of memory would show as a cost away
 * from the published one.
 *
 * Reading of the paper's model (common practice in the papers that reproduce it):
 * - fuel cost of unit i at output P while on: a + b·P + c·P² per hour, P in [Pmin, Pmax];
 * - minimum up and down times MU, MD in hours;
 * - a start is hot when the unit has been off for at most MD + "cold start hours", else cold;
 * - initial state: on for +h hours, or off for −h hours;
 * - spinning reserve: the committed capacity must exceed the load by 10 %, i.e. Σ Pmax·on ≥ 1.1·L;
 * - no ramp limits, no network.
 *
 * Encoded as a Gridwright site spec with MW read as kW: an island with a hard load, the ten
 * units as generators, `noLoadCostPerHour` = a, hot/cold `startupCost` with `coldAfterSteps` =
 * MD + cold-start hours, and `reserve.upKw` = 10 % of the load (a generator holds rating·on − p,
 * so Σ held ≥ 0.1·L is Σ Pmax·on ≥ 1.1·L when supply meets the load).
 *
 * The quadratic becomes a convex piecewise-linear `costCurve` of 1 + SEGMENTS slices, each
 * priced at the slope of the chord over it: slice 0 runs from 0 to Pmin at (F(Pmin) − a)/Pmin =
 * b + c·Pmin, so the cost at Pmin is exact; then SEGMENTS slices of equal width w = (Pmax −
 * Pmin)/SEGMENTS at b + c·(x_{k−1} + x_k). Chords of a convex function lie above it and meet it
 * at the breakpoints, so the fit never undercuts the quadratic and exceeds it by at most c·w²/4
 * (at a segment's midpoint). Equal widths are the simplest choice that bounds every unit's
 * error by the same formula. Slopes are rounded to 1e-10 so the JSON reads cleanly; that moves a
 * unit's hourly cost by less than 1e-7.
 */
import type { SiteSpec } from '@gridwright/shared/site-spec';

export interface ThermalUnit {
  pmax: number;
  pmin: number;
  a: number;
  b: number;
  c: number;
  minUp: number;
  minDown: number;
  hotStart: number;
  coldStart: number;
  coldStartHours: number;
  /** + hours on, − hours off, before hour 1. */
  initialHours: number;
}

/** The data table, from memory of Kazarlis, Bakirtzis and Petridis (1996), Table I. */
export const TEN_UNITS: ThermalUnit[] = [
  { pmax: 455, pmin: 150, a: 1000, b: 16.19, c: 0.00048, minUp: 8, minDown: 8, hotStart: 4500, coldStart: 9000, coldStartHours: 5, initialHours: 8 },
  { pmax: 455, pmin: 150, a: 970, b: 17.26, c: 0.00031, minUp: 8, minDown: 8, hotStart: 5000, coldStart: 10000, coldStartHours: 5, initialHours: 8 },
  { pmax: 130, pmin: 20, a: 700, b: 16.6, c: 0.002, minUp: 5, minDown: 5, hotStart: 550, coldStart: 1100, coldStartHours: 4, initialHours: -5 },
  { pmax: 130, pmin: 20, a: 680, b: 16.5, c: 0.00211, minUp: 5, minDown: 5, hotStart: 560, coldStart: 1120, coldStartHours: 4, initialHours: -5 },
  { pmax: 162, pmin: 25, a: 450, b: 19.7, c: 0.00398, minUp: 6, minDown: 6, hotStart: 900, coldStart: 1800, coldStartHours: 4, initialHours: -6 },
  { pmax: 80, pmin: 20, a: 370, b: 22.26, c: 0.00712, minUp: 3, minDown: 3, hotStart: 170, coldStart: 340, coldStartHours: 2, initialHours: -3 },
  { pmax: 85, pmin: 25, a: 480, b: 27.74, c: 0.00079, minUp: 3, minDown: 3, hotStart: 260, coldStart: 520, coldStartHours: 2, initialHours: -3 },
  { pmax: 55, pmin: 10, a: 660, b: 25.92, c: 0.00413, minUp: 1, minDown: 1, hotStart: 30, coldStart: 60, coldStartHours: 0, initialHours: -1 },
  { pmax: 55, pmin: 10, a: 665, b: 27.27, c: 0.00222, minUp: 1, minDown: 1, hotStart: 30, coldStart: 60, coldStartHours: 0, initialHours: -1 },
  { pmax: 55, pmin: 10, a: 670, b: 27.79, c: 0.00173, minUp: 1, minDown: 1, hotStart: 30, coldStart: 60, coldStartHours: 0, initialHours: -1 },
];

/** Hourly load in MW (read as kW), hours 1–24, from memory of the same paper. */
export const TEN_UNIT_LOAD = [
  700, 750, 850, 950, 1000, 1100, 1150, 1200, 1300, 1400, 1450, 1500,
  1400, 1300, 1200, 1050, 1000, 1100, 1200, 1400, 1300, 1100, 900, 800,
];

/**
 * The best-known total cost of the system with quadratic costs and 10 % reserve, as the
 * literature reproducing the paper reports it (about 563 938, rounded to the unit).
 */
export const BEST_KNOWN_QUADRATIC_COST = 563_938;

/** Equal-width chord segments between Pmin and Pmax (plus the slice from 0 to Pmin). */
export const SEGMENTS = 4;

/** The chord slopes of the fit: slice 0 over [0, Pmin], then SEGMENTS equal slices up to Pmax. */
export function costCurve(unit: ThermalUnit): { upToKw: number; costPerKwh: number }[] {
  const width = (unit.pmax - unit.pmin) / SEGMENTS;
  const slope = (x: number) => Number(x.toFixed(10));
  const curve = [{ upToKw: unit.pmin, costPerKwh: slope(unit.b + unit.c * unit.pmin) }];
  for (let k = 1; k <= SEGMENTS; k++) {
    const lower = unit.pmin + (k - 1) * width;
    const upper = k === SEGMENTS ? unit.pmax : unit.pmin + k * width;
    curve.push({ upToKw: upper, costPerKwh: slope(unit.b + unit.c * (lower + upper)) });
  }
  return curve;
}

/** The most the fit can exceed the quadratic in one hour of one unit on: c·w²/4. */
export function linearisationErrorPerHour(unit: ThermalUnit): number {
  const width = (unit.pmax - unit.pmin) / SEGMENTS;
  return (unit.c * width * width) / 4;
}

/** The site spec, as `tests/reference/ten-unit-system.json` holds it. */
export function tenUnitSiteSpec(): SiteSpec {
  return {
    name: 'Ten-unit thermal system, 24 h (Kazarlis, Bakirtzis and Petridis 1996), MW read as kW',
    horizon: { start: '2027-01-04T00:00:00Z', stepMinutes: 60, steps: 24 },
    supply: { availableKw: TEN_UNIT_LOAD.map(() => 0) },
    siteLoad: { kw: TEN_UNIT_LOAD },
    units: TEN_UNITS.map((unit, i) => ({
      id: `unit-${i + 1}`,
      kind: 'generator' as const,
      ratingKw: unit.pmax,
      minStableKw: unit.pmin,
      noLoadCostPerHour: unit.a,
      costCurve: costCurve(unit),
      startupCost: { hot: unit.hotStart, cold: unit.coldStart, coldAfterSteps: unit.minDown + unit.coldStartHours },
      minUpSteps: unit.minUp,
      minDownSteps: unit.minDown,
      initial: { on: unit.initialHours > 0, stepsInState: Math.abs(unit.initialHours) },
    })),
    reserve: { upKw: TEN_UNIT_LOAD.map((load) => load / 10) },
    solver: { mode: 'monolithic', mipGap: 1e-5, timeLimitSeconds: 3600 },
  };
}
