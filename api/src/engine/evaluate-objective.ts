import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ObjectiveTerms } from '@gridwright/shared/run-result';
import { countStarts, startCost } from './count-starts';
import { demandChargePeaks } from './demand-charge-peaks';
import { reserveHeld } from './reserve-held';
import type { ScheduleBuffers } from './schedule-buffers';
import { curveValuePerHour } from './unit-curves';

/** SPEC.md §2 and §5's objective, evaluated on a (stitched) schedule in the spec's own units, term by term. */
export function objectiveTerms(spec: ResolvedSiteSpec, chargeSteps: Uint8Array[], b: ScheduleBuffers): ObjectiveTerms {
  const dh = spec.horizon.stepMinutes / 60;
  const T = spec.horizon.steps;
  const terms: ObjectiveTerms = { energy: 0, noLoad: 0, starts: 0, demandCharges: 0, penalties: 0, cycleCost: 0 };
  const unserved = spec.siteLoad.unservedPenaltyPerKwh ?? 0;
  for (let t = 0; t < T; t++) {
    terms.energy += dh * (spec.grid.exportPrice[t] * b.exp[t] - spec.grid.importPrice[t] * b.imp[t]);
    terms.penalties -= dh * unserved * b.unserved[t];
  }
  spec.units.forEach((u, i) => {
    const { on, power } = b.units[i];
    for (let t = 0; t < T; t++) {
      terms.energy += dh * curveValuePerHour(u, power[t]);
      if (on[t]) terms.noLoad -= dh * u.noLoadCostPerHour;
    }
    terms.starts -= startCost(u, countStarts(u, on));
  });
  spec.storage.forEach((s, i) => {
    const d = b.storage[i].discharge;
    for (let t = 0; t < T; t++) terms.cycleCost -= dh * s.cycleCostPerKwh * d[t];
  });
  spec.stores.forEach((s, j) => {
    if (s.shortfallPenaltyPerUnit === null) return;
    for (let t = 0; t < T; t++) terms.penalties -= dh * s.shortfallPenaltyPerUnit * b.stores[j].shortfall[t];
  });
  if (spec.reserve?.shortfallPenaltyPerKwh) {
    const { shortfall } = reserveHeld(spec, b);
    for (let t = 0; t < T; t++) terms.penalties -= dh * spec.reserve.shortfallPenaltyPerKwh * shortfall[t];
  }
  demandChargePeaks(spec, chargeSteps, b.imp).forEach((peak, c) => {
    const charge = spec.grid.demandCharges[c];
    terms.demandCharges -= charge.pricePerKw * (peak - charge.existingPeakKw);
  });
  return terms;
}

export const sumTerms = (t: ObjectiveTerms) => t.energy + t.noLoad + t.starts + t.demandCharges + t.penalties + t.cycleCost;
