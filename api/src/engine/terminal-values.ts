import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { firstSlicePrice } from './unit-curves';

/**
 * What island energy is worth to the site, used only to price energy left in storage at a
 * window's end: the fuel it saves, or the best flexible use, or the unserved-load penalty. A
 * hard load on an island without generators has no price, yet energy kept for it may be all
 * that serves it after dark: it is valued above every per-kWh figure the spec states, so a
 * window ends with its storage as full as supply allows rather than indifferently empty.
 */
export function islandEnergyValue(spec: ResolvedSiteSpec): number {
  const gens = spec.units.filter((u) => u.kind === 'generator');
  if (gens.length) return Math.max(0, Math.min(...gens.map(firstSlicePrice)));
  const flex = spec.units.filter((u) => u.kind === 'flexible-load');
  const bestFlex = flex.length ? Math.max(0, ...flex.map(firstSlicePrice)) : 0;
  const penalty = spec.siteLoad.unservedPenaltyPerKwh;
  if (penalty !== null || !spec.siteLoad.kw.some((kw) => kw > 0)) return Math.max(bestFlex, penalty ?? 0);
  const stated = Math.max(bestFlex, ...spec.storage.map((s) => s.cycleCostPerKwh));
  return stated > 0 ? 2 * stated : 1;
}

/** The value of a kWh at step t: the import price where the site can import, else the export price, else the island's value. */
export function energyValueAt(spec: ResolvedSiteSpec, t: number, island: number): number {
  if (spec.grid.importLimitKw > 0) return spec.grid.importPrice[t];
  if (spec.grid.exportLimitKw > 0) return spec.grid.exportPrice[t];
  return island;
}

function median(values: number[]): number {
  if (!values.length) return 0;
  const sorted = values.slice().sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/**
 * The energy value a non-final window credits for what it leaves in storage: the median value of
 * a kWh over the steps the window looks ahead without keeping (over the whole window when it
 * keeps every step), never negative.
 */
export function lookaheadEnergyValue(spec: ResolvedSiteSpec, from: number, steps: number, commit: number, island: number): number {
  const values: number[] = [];
  for (let k = commit; k < steps; k++) values.push(energyValueAt(spec, from + k, island));
  if (!values.length) for (let k = 0; k < steps; k++) values.push(energyValueAt(spec, from + k, island));
  return Math.max(0, median(values));
}

/**
 * The value of one unit of each store's product left at a non-final window's end: a "water value"
 * read off the merit order of the whole horizon. The product the horizon needs (its demand, the
 * final level above the initial one, less what flows in) is made in the cheapest steps the
 * producers have — each step offering its producers' rating in product at the energy value of that
 * step divided by their yield — and the dearest of those steps sets the value: product left at a
 * window's end saves making it there later. A step's energy comes first from supply above the site
 * load (worth its export price, or nothing where it would be curtailed), then from the grid at the
 * import price or on an island from generators at the island's value, each as far as it reaches.
 * A store no unit produces into is valued by what its
 * consumers turn a unit of it into (the energy it replaces), and a shortfall penalty caps every
 * value: a unit is never worth more than the penalty it saves. Computed once per spec.
 */
export function storeProductValues(spec: ResolvedSiteSpec, island: number): number[] {
  const dh = spec.horizon.stepMinutes / 60;
  const T = spec.horizon.steps;
  return spec.stores.map((store, j) => {
    const producers = spec.units.filter((u) => u.produces?.store === j);
    let value = 0;
    if (producers.length) {
      let needed = (store.final ?? store.min) - store.initial;
      for (let t = 0; t < T; t++) needed += dh * (store.demandPerHour[t] - store.inflowPerHour[t]);
      if (needed > 0) {
        const offers: { cost: number; units: number }[] = [];
        // Producers with the best yield take the cheapest energy first.
        const byYield = producers.slice().sort((a, b) => b.produces!.perKwh - a.produces!.perKwh);
        const bought = spec.grid.importLimitKw > 0;
        for (let t = 0; t < T; t++) {
          const tranches = [
            { kw: Math.max(0, spec.supply.availableKw[t] - spec.siteLoad.kw[t]), price: spec.grid.exportLimitKw > 0 ? Math.max(0, spec.grid.exportPrice[t]) : 0 },
            { kw: bought ? spec.grid.importLimitKw : Infinity, price: bought ? spec.grid.importPrice[t] : island },
          ];
          for (const u of byYield) {
            const perKwh = u.produces!.perKwh;
            // A generator that makes product (heat from a genset) makes it beside power it is paid for.
            if (u.kind === 'generator') {
              offers.push({ cost: 0, units: dh * perKwh * u.ratingKw });
              continue;
            }
            let left = u.ratingKw;
            for (const tranche of tranches) {
              const kw = Math.min(left, tranche.kw);
              if (kw <= 0) continue;
              offers.push({ cost: tranche.price / perKwh, units: dh * perKwh * kw });
              tranche.kw -= kw;
              left -= kw;
            }
          }
        }
        offers.sort((a, b) => a.cost - b.cost);
        let made = 0;
        value = offers.length ? offers[offers.length - 1].cost : 0;
        for (const o of offers) {
          made += o.units;
          if (made >= needed) {
            value = o.cost;
            break;
          }
        }
      }
    } else {
      const energy = island > 0 ? island : Math.max(0, ...spec.grid.importPrice);
      for (const u of spec.units) if (u.consumes?.store === j) value = Math.max(value, energy / u.consumes.perKwh);
    }
    const penalty = store.shortfallPenaltyPerUnit;
    return penalty === null ? value : Math.min(value, penalty);
  });
}

/**
 * How a non-final window values product left in a store: the merit-order water value of the whole
 * horizon (storeProductValues, what runs use), the window's median energy value turned into product
 * as for batteries (medianEnergyStoreValue), or nothing. The alternatives exist for the design
 * benchmark that compares them (tests/bench/store-valuation.ts).
 */
export type StoreValuation = 'water-value' | 'median-energy' | 'none';

/**
 * A unit of product valued like stored energy: the window's median energy value (what a battery's
 * energy is credited at) per unit — over the best yield of the store's producers, or, for a store
 * nothing produces into, times what its consumers make of a unit.
 */
export function medianEnergyStoreValue(spec: ResolvedSiteSpec, j: number, energyValue: number): number {
  const yields = spec.units.filter((u) => u.produces?.store === j).map((u) => u.produces!.perKwh);
  if (yields.length) return energyValue / Math.max(...yields);
  let value = 0;
  for (const u of spec.units) if (u.consumes?.store === j) value = Math.max(value, energyValue / u.consumes.perKwh);
  return value;
}
