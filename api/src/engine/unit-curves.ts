import type { ResolvedUnit } from '@gridwright/shared/site-spec';

/** The width of each slice of a unit's curve: the kW between its `upToKw` and the previous one's. */
export function sliceWidths(u: ResolvedUnit): number[] {
  return u.curve.map((s, k) => s.upToKw - (k === 0 ? 0 : u.curve[k - 1].upToKw));
}

/**
 * The unit's energy value in money per hour at `powerKw`, filling slices from 0 kW: positive
 * for a flexible load (what the energy is worth to it), negative for a generator (what it costs).
 */
export function curveValuePerHour(u: ResolvedUnit, powerKw: number): number {
  let value = 0;
  let from = 0;
  for (const s of u.curve) {
    const inSlice = Math.min(s.upToKw, powerKw) - from;
    if (inSlice <= 0) break;
    value += inSlice * s.perKwh;
    from = s.upToKw;
  }
  return u.kind === 'generator' ? -value : value;
}

/** The cheapest kWh a generator makes (its first slice), or the most a flexible load pays for one. */
export const firstSlicePrice = (u: ResolvedUnit) => u.curve[0].perKwh;
