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

/** One piece of a concave value curve: `width` units (Infinity: without end), each worth `value`. */
export interface ValueSlice {
  width: number;
  value: number;
}

/** A concave curve that credits every unit alike; no slices for a value of 0. */
export const flatValue = (value: number): ValueSlice[] => (value > 0 ? [{ width: Infinity, value }] : []);

/** The one value a curve credits every unit at (0 for no slices); null when its slices differ. */
export const flatCredit = (curve: ValueSlice[]): number | null =>
  curve.length === 0 ? 0 : curve.length === 1 && curve[0].width === Infinity ? curve[0].value : null;

/** A step's producers offering `units` of product at `cost` per unit. */
interface Offer {
  cost: number;
  units: number;
}

/**
 * The product store `j`'s producers could make over the steps [from, to), in offers sorted from
 * the cheapest: each step offers its producers' rating in product at the energy value of that step
 * divided by their yield, producers with the best yield taking the cheapest energy first. A step's
 * energy comes first from supply above the site load (worth its export price, or nothing where it
 * would be curtailed), then from the grid at the import price or on an island from generators at
 * the island's value, each as far as it reaches. A generator that makes product (heat from a
 * genset) makes it beside power it is paid for: at no cost.
 */
function productOffers(spec: ResolvedSiteSpec, j: number, from: number, to: number, island: number): Offer[] {
  const dh = spec.horizon.stepMinutes / 60;
  const producers = spec.units.filter((u) => u.produces?.store === j);
  const byYield = producers.slice().sort((a, b) => b.produces!.perKwh - a.produces!.perKwh);
  const bought = spec.grid.importLimitKw > 0;
  const offers: Offer[] = [];
  for (let t = from; t < to; t++) {
    const tranches = [
      { kw: Math.max(0, spec.supply.availableKw[t] - spec.siteLoad.kw[t]), price: spec.grid.exportLimitKw > 0 ? Math.max(0, spec.grid.exportPrice[t]) : 0 },
      { kw: bought ? spec.grid.importLimitKw : Infinity, price: bought ? spec.grid.importPrice[t] : island },
    ];
    for (const u of byYield) {
      const perKwh = u.produces!.perKwh;
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
  return offers.sort((a, b) => a.cost - b.cost);
}

/** A unit of store `j`'s product worth the energy its best consumer makes of it, at `energyValue` a kWh. */
function consumerValue(spec: ResolvedSiteSpec, j: number, energyValue: number): number {
  let value = 0;
  for (const u of spec.units) if (u.consumes?.store === j) value = Math.max(value, energyValue / u.consumes.perKwh);
  return value;
}

/** What a store with no producer saves per unit: the energy its consumers make of it, at the island's value or the dearest import. */
const consumedProductValue = (spec: ResolvedSiteSpec, j: number, island: number) =>
  consumerValue(spec, j, island > 0 ? island : Math.max(0, ...spec.grid.importPrice));

/** Demand less inflow over the steps [from, to): the product they must get from production or the level. */
function netDemand(spec: ResolvedSiteSpec, j: number, from: number, to: number): number {
  const dh = spec.horizon.stepMinutes / 60;
  const store = spec.stores[j];
  let units = 0;
  for (let t = from; t < to; t++) units += dh * (store.demandPerHour[t] - store.inflowPerHour[t]);
  return units;
}

/**
 * The value of one unit of each store's product left at a window's end, one figure for the whole
 * horizon (a "water value"; the bound blocks of horizon-bound.ts price levels with it where a
 * marginal value is missing): the product the horizon needs (its demand, the final level above
 * the initial one, less what flows in) is made in the cheapest offers of productOffers, and the
 * dearest of those sets the value. A store no unit produces into is valued by what its consumers
 * turn a unit of it into, and a shortfall penalty caps every value: a unit is never worth more
 * than the penalty it saves. Computed once per spec.
 */
export function storeProductValues(spec: ResolvedSiteSpec, island: number): number[] {
  const T = spec.horizon.steps;
  return spec.stores.map((store, j) => {
    let value = 0;
    if (spec.units.some((u) => u.produces?.store === j)) {
      const needed = (store.final ?? store.min) - store.initial + netDemand(spec, j, 0, T);
      if (needed > 0) {
        const offers = productOffers(spec, j, 0, T, island);
        value = offers.length ? offers[offers.length - 1].cost : 0;
        let made = 0;
        for (const o of offers) {
          made += o.units;
          if (made >= needed) {
            value = o.cost;
            break;
          }
        }
      }
    } else {
      value = consumedProductValue(spec, j, island);
    }
    const penalty = store.shortfallPenaltyPerUnit;
    return penalty === null ? value : Math.min(value, penalty);
  });
}

/** A window's value curve has at most this many slices: each is a column, and prices rarely have more tiers. */
const MAX_VALUE_SLICES = 6;

/**
 * How a non-final window values product it leaves in store `j` (units above the store's minimum),
 * from what that product saves over the steps [from, to) that follow the window: those steps'
 * net demand is met by their cheapest production offers, so the first unit left saves the dearest
 * offer used, the next unit the next dearest, and a unit beyond their net demand saves nothing
 * (it may still serve later, but the next window values it again from its own end). Demand the
 * offers cannot meet is worth the shortfall penalty, or, for a hard demand, the dearest offer.
 * Falling values make the curve concave, so a maximising model fills the slices in order. A
 * single value for all product (storeProductValues) credited the last unit as much as the first:
 * the pump station's windows then kept its reservoir fuller overnight than the optimum does, to
 * hand water to a next window that did not need it (tests/bench/RESULTS.md, store valuation).
 */
export function storeValueCurve(spec: ResolvedSiteSpec, j: number, from: number, to: number, island: number): ValueSlice[] {
  const store = spec.stores[j];
  const penalty = store.shortfallPenaltyPerUnit;
  const capped = (value: number) => (penalty === null ? value : Math.min(value, penalty));
  if (!spec.units.some((u) => u.produces?.store === j)) return flatValue(capped(consumedProductValue(spec, j, island)));
  let needed = netDemand(spec, j, from, to) + (to >= spec.horizon.steps ? (store.final ?? store.min) - store.min : 0);
  if (needed <= 0) return [];
  const offers = productOffers(spec, j, from, to, island);
  const used: ValueSlice[] = [];
  for (const o of offers) {
    if (needed <= 0) break;
    const width = Math.min(o.units, needed);
    used.push({ width, value: capped(o.cost) });
    needed -= width;
  }
  if (needed > 0) used.push({ width: needed, value: capped(penalty ?? (offers.length ? offers[offers.length - 1].cost : 0)) });
  return fewerSlices(used.reverse().filter((s) => s.value > 0 && s.width > 0));
}

/** Merges equal neighbours, then the closest neighbours (at their weighted mean) down to MAX_VALUE_SLICES; values stay falling. */
function fewerSlices(slices: ValueSlice[]): ValueSlice[] {
  const out: ValueSlice[] = [];
  for (const s of slices) {
    const last = out[out.length - 1];
    if (last && last.value === s.value) last.width += s.width;
    else out.push({ ...s });
  }
  while (out.length > MAX_VALUE_SLICES) {
    let best = 0;
    for (let i = 1; i < out.length - 1; i++) if (out[i].value - out[i + 1].value < out[best].value - out[best + 1].value) best = i;
    const [a, b] = [out[best], out[best + 1]];
    const width = a.width + b.width;
    out.splice(best, 2, { width, value: (a.value * a.width + b.value * b.width) / width });
  }
  return out;
}

/**
 * How a non-final window values product left in a store: the value curve of the steps after its
 * end (storeValueCurve, what runs use), one merit-order value for the whole horizon
 * (storeProductValues), the window's median energy value turned into product as for batteries
 * (medianEnergyStoreValue), or nothing. The alternatives exist for the design benchmark that
 * compares them (tests/bench/store-valuation.ts).
 */
export type StoreValuation = 'value-curve' | 'horizon-value' | 'median-energy' | 'none';

/**
 * A unit of product valued like stored energy: the window's median energy value (what a battery's
 * energy is credited at) per unit — over the best yield of the store's producers, or, for a store
 * nothing produces into, times what its consumers make of a unit.
 */
export function medianEnergyStoreValue(spec: ResolvedSiteSpec, j: number, energyValue: number): number {
  const yields = spec.units.filter((u) => u.produces?.store === j).map((u) => u.produces!.perKwh);
  return yields.length ? energyValue / Math.max(...yields) : consumerValue(spec, j, energyValue);
}
