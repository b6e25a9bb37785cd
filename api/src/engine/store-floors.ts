import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';

/**
 * Per store and step, the lowest level at the end of that step from which the rest of the
 * horizon can still meet the hard demand, the minimum level and the final target, producing at
 * full rating and consuming nothing. Any feasible schedule stays at or above it, so a rolling
 * window may require it at its end without cutting off a feasible schedule; it keeps an early
 * window from drawing a store down that a later window would need full. Infinity where even
 * that is impossible (a demand the producers can never meet).
 */
export function storeLevelFloors(spec: ResolvedSiteSpec): Float64Array[] {
  const T = spec.horizon.steps;
  const dh = spec.horizon.stepMinutes / 60;
  return spec.stores.map((s, j) => {
    let production = 0;
    for (const u of spec.units) if (u.produces?.store === j) production += u.produces.perKwh * u.ratingKw;
    const keep = 1 - s.lossPerHour * dh;
    const hard = s.shortfallPenaltyPerUnit === null;
    const floors = new Float64Array(T);
    let need = Math.max(s.min, s.final ?? s.min);
    for (let t = T - 1; t >= 0; t--) {
      floors[t] = need;
      const drawn = (hard ? s.demandPerHour[t] : 0) - s.inflowPerHour[t];
      const before = keep > 0 ? (need - dh * (production - drawn)) / keep : need > dh * (production - drawn) ? Infinity : 0;
      need = Math.max(s.min, before);
    }
    return floors;
  });
}
