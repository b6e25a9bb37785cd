import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { demandChargeSteps } from './demand-charge-steps';

/** Per demand charge, the highest import in its window over the horizon, at least its existingPeakKw. */
export function demandChargePeaks(spec: ResolvedSiteSpec, importKw: ArrayLike<number>): number[] {
  const masks = demandChargeSteps(spec);
  return spec.grid.demandCharges.map((charge, c) => {
    let peak = charge.existingPeakKw;
    for (let t = 0; t < importKw.length; t++) if (masks[c][t] && importKw[t] > peak) peak = importKw[t];
    return peak;
  });
}
