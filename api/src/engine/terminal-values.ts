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
 * The value of one unit of a store's product left at a non-final window's end, from the energy it
 * embodies: a producer spends 1/perKwh kWh on it, a consumer turns it into 1/perKwh kWh, each kWh
 * worth `energyValue` (the same estimate storage is credited at). The most either way, since the
 * product can replace that energy later; a shortfall penalty caps it (a unit is never worth more
 * than the penalty it saves). A store linked to no unit only meets its demand from its level, and
 * keeps the penalty's value (or none).
 */
export function storeProductValue(spec: ResolvedSiteSpec, store: number, energyValue: number): number {
  let best = 0;
  for (const u of spec.units) {
    for (const link of [u.produces, u.consumes]) {
      if (link && link.store === store) best = Math.max(best, energyValue / link.perKwh);
    }
  }
  const penalty = spec.stores[store].shortfallPenaltyPerUnit;
  if (penalty !== null) best = best > 0 ? Math.min(best, penalty) : penalty;
  return best;
}
