import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ResultWarning } from '@gridwright/shared/run-result';
import { nonZeroSpan } from './coefficient-ranges';
import { MAGNITUDE_SPREAD_LIMIT } from './numerics';
import { precheckInfeasibility } from './precheck-infeasibility';
import { demandChargeSteps } from './demand-charge-steps';
import { ratingSums, reachableKw } from './site-ratings';

/** The smallest and largest non-zero figure when they lie more than MAGNITUDE_SPREAD_LIMIT apart. */
function spread(values: number[]): [number, number] | null {
  const span = nonZeroSpan(values);
  return span && span[1] / span[0] > MAGNITUDE_SPREAD_LIMIT ? span : null;
}

/**
 * What an engineer wants to know before solving: the cheap infeasibility proofs, units that can
 * never run, and figures spanning so many orders of magnitude that the numerics suffer.
 */
export function specWarnings(spec: ResolvedSiteSpec): ResultWarning[] {
  const warnings = precheckInfeasibility(spec);
  const T = spec.horizon.steps;
  const sums = ratingSums(spec);

  spec.units.forEach((u, i) => {
    if (u.minStableKw <= 0) return;
    let best = 0;
    for (let t = 0; t < T; t++) {
      const reach = reachableKw(spec, sums, u.kind, t);
      if (reach > best) best = reach;
    }
    if (best < u.minStableKw) {
      warnings.push({
        code: 'min-stable-unreachable',
        message:
          u.kind === 'generator'
            ? `Generator "${u.id}" can never run: at no step can the site absorb its minStableKw of ${u.minStableKw} kW (at most ${best} kW).`
            : `Flexible load "${u.id}" can never run: at no step can ${u.minStableKw} kW (its minStableKw) reach it (at most ${best} kW).`,
        pointer: `/units/${i}/minStableKw`,
      });
    }
  });

  demandChargeSteps(spec).forEach((mask, c) => {
    if (mask.includes(1)) return;
    const charge = spec.grid.demandCharges[c];
    warnings.push({
      code: 'demand-charge-no-steps',
      message: `Demand charge "${charge.id}" applies at no step of the horizon (${charge.window.from}–${charge.window.to} local time on weekdays ${charge.window.daysOfWeek.join(', ')}): it costs nothing in this run.`,
      pointer: `/grid/demandCharges/${c}/window`,
    });
  });

  const prices = [
    ...spec.grid.importPrice,
    ...spec.grid.exportPrice,
    ...spec.units.flatMap((u) => [...u.curve.map((s) => s.perKwh), u.noLoadCostPerHour, u.startupCost.hot, u.startupCost.cold]),
  ];
  const priceSpread = spread(prices);
  if (priceSpread) {
    warnings.push({
      code: 'magnitude-spread',
      message: `Prices and costs span ${priceSpread[0]} to ${priceSpread[1]}: more than ${MAGNITUDE_SPREAD_LIMIT.toExponential(0)} apart, which strains the solver's tolerances.`,
      pointer: '/grid',
    });
  }
  const powers = [
    ...spec.units.flatMap((u) => [u.ratingKw, u.minStableKw]),
    ...spec.storage.flatMap((s) => [s.capacityKwh, s.maxChargeKw, s.maxDischargeKw]),
    spec.grid.importLimitKw,
    spec.grid.exportLimitKw,
  ];
  const powerSpread = spread(powers);
  if (powerSpread) {
    warnings.push({
      code: 'magnitude-spread',
      message: `Ratings span ${powerSpread[0]} to ${powerSpread[1]} kW/kWh: more than ${MAGNITUDE_SPREAD_LIMIT.toExponential(0)} apart, which strains the solver's tolerances.`,
      pointer: '/units',
    });
  }
  return warnings;
}
