import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';

/**
 * Internal units: a model variable of 1 means `powerKw` kW (kWh for SOC); an objective of 1 means
 * `money`; a store level of 1 means `stores[j]` units of that store's product; a demand-charge peak
 * of 1 means `demandPeakKw` kW.
 */
export interface Scales {
  powerKw: number;
  money: number;
  stores: number[];
  demandPeakKw: number;
}

function powerOfTenNear(values: number[]): number {
  const positive = values.filter((v) => v > 0 && Number.isFinite(v));
  if (!positive.length) return 1;
  let lo = Infinity;
  let hi = 0;
  for (const v of positive) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  // The geometric middle of the span puts the smallest and largest equally far from 1.
  return 10 ** Math.round((Math.log10(lo) + Math.log10(hi)) / 2);
}

function maxOf(values: number[]): number {
  let m = 0;
  for (const v of values) if (v > m) m = v;
  return m;
}

/**
 * Powers of ten for power and money, so that bounds, right-hand sides and objective
 * coefficients sit near 1 (HiGHS's numerics advice, common practice). Powers of ten keep the
 * unscaled schedule exact in decimal.
 */
export function chooseScales(spec: ResolvedSiteSpec, enabled: boolean): Scales {
  if (!enabled) return { powerKw: 1, money: 1, stores: spec.stores.map(() => 1), demandPeakKw: 1 };
  const powers = [
    maxOf(spec.supply.availableKw),
    maxOf(spec.siteLoad.kw),
    spec.grid.importLimitKw,
    spec.grid.exportLimitKw,
    ...spec.units.map((u) => u.ratingKw),
    ...spec.units.map((u) => u.minStableKw),
    ...spec.storage.flatMap((s) => [s.maxChargeKw, s.maxDischargeKw, s.capacityKwh]),
  ];
  const powerKw = powerOfTenNear(powers);
  const dh = spec.horizon.stepMinutes / 60;
  const perStepValue = (pricePerKwh: number) => Math.abs(pricePerKwh) * dh * powerKw;
  const money: number[] = [
    ...spec.units.flatMap((u) => [
      ...u.curve.map((slice) => perStepValue(slice.perKwh)),
      u.noLoadCostPerHour * dh,
      u.startupCost.hot,
      u.startupCost.cold - u.startupCost.hot,
    ]),
    ...spec.storage.map((s) => perStepValue(s.cycleCostPerKwh)),
    perStepValue(spec.siteLoad.unservedPenaltyPerKwh ?? 0),
    perStepValue(spec.reserve?.shortfallPenaltyPerKwh ?? 0),
    perStepValue(maxOf(spec.grid.importPrice.map(Math.abs))),
    perStepValue(maxOf(spec.grid.exportPrice.map(Math.abs))),
    ...spec.grid.demandCharges.map((c) => c.pricePerKw * powerKw),
  ];
  const stores = spec.stores.map((s, j) =>
    powerOfTenNear([
      s.capacity,
      s.min,
      maxOf(s.demandPerHour) * dh,
      maxOf(s.inflowPerHour) * dh,
      ...spec.units.flatMap((u) => [u.produces, u.consumes].filter((l) => l?.store === j).map((l) => l!.perKwh * powerKw * dh)),
    ]),
  );
  const storeMoney = spec.stores.map((s, j) => (s.shortfallPenaltyPerUnit ?? 0) * stores[j] * dh);
  return { powerKw, money: powerOfTenNear([...money, ...storeMoney]), stores, demandPeakKw: demandPeakUnit(spec, powerKw, dh) };
}

/**
 * A kW of monthly peak costs what hundreds of kWh of energy do, so in the power unit its objective
 * coefficient would sit orders of magnitude above the energy prices. The peak gets its own unit,
 * a power of ten below the power unit, that splits that ratio between the objective (its price)
 * and the matrix (its entry in `import ≤ peak`), keeping both near 1.
 */
function demandPeakUnit(spec: ResolvedSiteSpec, powerKw: number, dh: number): number {
  const peakPrice = maxOf(spec.grid.demandCharges.map((c) => c.pricePerKw));
  const energyPrice = Math.max(maxOf(spec.grid.importPrice.map(Math.abs)), maxOf(spec.grid.exportPrice.map(Math.abs))) * dh;
  if (peakPrice <= 0 || energyPrice <= 0 || peakPrice <= energyPrice) return powerKw;
  return powerKw * 10 ** -Math.round(Math.log10(peakPrice / energyPrice) / 2);
}
