import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';

/** Per demand charge, the highest import in its window (`masks`, demand-charge-steps.ts) over the horizon, at least its existingPeakKw. */
export function demandChargePeaks(spec: ResolvedSiteSpec, masks: Uint8Array[], importKw: ArrayLike<number>): number[] {
  return spec.grid.demandCharges.map((charge, c) => {
    let peak = charge.existingPeakKw;
    for (let t = 0; t < importKw.length; t++) if (masks[c][t] && importKw[t] > peak) peak = importKw[t];
    return peak;
  });
}
