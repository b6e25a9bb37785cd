import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { ResultWarning } from '@gridwright/shared/run-result';
import { demandChargeSteps } from './demand-charge-steps';
import { precheckInfeasibility } from './precheck-infeasibility';
import { unitRatings } from './unit-ratings';

/** Ratios beyond this between the smallest and largest non-zero figure of one kind get a warning. */
const SPREAD_LIMIT = 1e6;

function spread(values: number[]): [number, number] | null {
  let lo = Infinity;
  let hi = 0;
  for (const v of values) {
    const a = Math.abs(v);
    if (a === 0) continue;
    lo = Math.min(lo, a);
    hi = Math.max(hi, a);
  }
  return hi > 0 && hi / lo > SPREAD_LIMIT ? [lo, hi] : null;
}

/**
 * What an engineer wants to know before solving: the cheap infeasibility proofs, units that can
 * never run, and figures spanning so many orders of magnitude that the numerics suffer.
 */
export function specWarnings(spec: ResolvedSiteSpec): ResultWarning[] {
  const warnings = precheckInfeasibility(spec);
  const T = spec.horizon.steps;
  const { generatorKw: genRatings, flexibleKw: flexRatings } = unitRatings(spec);
  let charge = 0;
  let discharge = 0;
  for (const s of spec.storage) {
    charge += s.maxChargeKw;
    discharge += s.maxDischargeKw;
  }
  const hard = spec.siteLoad.unservedPenaltyPerKwh === null;

  spec.units.forEach((u, i) => {
    if (u.minStableKw <= 0) return;
    let best = 0;
    for (let t = 0; t < T; t++) {
      const reach =
        u.kind === 'generator'
          ? spec.siteLoad.kw[t] + spec.grid.exportLimitKw + flexRatings + charge
          : spec.supply.availableKw[t] + spec.grid.importLimitKw + genRatings + discharge - (hard ? spec.siteLoad.kw[t] : 0);
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
      message: `Prices and costs span ${priceSpread[0]} to ${priceSpread[1]}: more than ${SPREAD_LIMIT.toExponential(0)} apart, which strains the solver's tolerances.`,
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
      message: `Ratings span ${powerSpread[0]} to ${powerSpread[1]} kW/kWh: more than ${SPREAD_LIMIT.toExponential(0)} apart, which strains the solver's tolerances.`,
      pointer: '/units',
    });
  }
  return warnings;
}
