/**
 * Invented benchmark sites, generated deterministically (a fixed-seed LCG), so every run of
 * `npm run bench` measures the same models.
 */
import type { ResolvedSiteSpec, SiteSpec } from '@gridwright/shared/site-spec';
import { resolveSpec } from '../reference/support/specs';

/** Park–Miller style LCG: deterministic noise without a dependency. */
export function lcg(seed: number): () => number {
  let s = seed % 2147483647;
  return () => {
    s = (s * 48271) % 2147483647;
    return s / 2147483647;
  };
}

export const round1 = (x: number) => Math.round(x * 10) / 10;

/**
 * Solar output in kW for `steps` steps from midnight: a sine between 05:30 and 21:00 (a June
 * day), times a cloud factor that changes every hour.
 */
export function solar(steps: number, stepMinutes: number, peakKw: number, seed: number): number[] {
  const rnd = lcg(seed);
  const perHour = 60 / stepMinutes;
  const out: number[] = [];
  let cloud = 1;
  for (let t = 0; t < steps; t++) {
    if (t % perHour === 0) cloud = 0.35 + 0.65 * rnd();
    const hour = ((t * stepMinutes) / 60) % 24;
    const sun = hour > 5.5 && hour < 21 ? Math.sin((Math.PI * (hour - 5.5)) / 15.5) : 0;
    out.push(round1(peakKw * sun * cloud));
  }
  return out;
}

/** A 7-day, 15-minute, solar-only site: three flexible loads on an island PV array. */
export function solarWeekSite(): ResolvedSiteSpec {
  const steps = 7 * 96;
  return resolveSpec({
    name: 'Bench: solar-fed pumping and cooling, one week',
    horizon: { start: '2027-06-07T00:00:00+02:00', stepMinutes: 15, steps },
    supply: { availableKw: solar(steps, 15, 1200, 11) },
    units: [
      { id: 'pump-a', kind: 'flexible-load', ratingKw: 400, minStableKw: 150, valuePerKwh: 0.06, startupCost: 8, minUpSteps: 8, minDownSteps: 4 },
      { id: 'pump-b', kind: 'flexible-load', ratingKw: 300, minStableKw: 120, valuePerKwh: 0.05, startupCost: 6, minUpSteps: 4, minDownSteps: 4 },
      { id: 'chiller', kind: 'flexible-load', ratingKw: 500, minStableKw: 200, valuePerKwh: 0.07, startupCost: 10, minUpSteps: 6, minDownSteps: 8 },
    ],
    solver: { mode: 'monolithic', mipGap: 1e-4, timeLimitSeconds: 300 },
  });
}

/**
 * The week site's units on `days` days of its solar profile repeated (no grid, no storage): a
 * model that falls apart into one independent block per day.
 */
export function solarOnlySite(days: number): ResolvedSiteSpec {
  const week = solarWeekSite();
  const steps = days * 96;
  const profile = week.supply.availableKw;
  return resolveSpec({
    name: `Bench: solar-fed pumping and cooling, ${days} days`,
    horizon: { start: week.horizon.start, stepMinutes: 15, steps },
    supply: { availableKw: Array.from({ length: steps }, (_, t) => profile[t % profile.length]) },
    units: week.units.map((u) => ({
      id: u.id,
      kind: u.kind,
      ratingKw: u.ratingKw,
      minStableKw: u.minStableKw,
      valuePerKwh: u.curve[0].perKwh,
      startupCost: u.startupCost.hot,
      minUpSteps: u.minUpSteps,
      minDownSteps: u.minDownSteps,
    })),
    solver: { mode: 'monolithic', mipGap: 1e-4, timeLimitSeconds: 600 },
  });
}

/**
 * A grid-tied site with solar, a site load, a battery, a backup generator and an electrolyser,
 * `days` days at `stepMinutes`. Time-of-use prices with a morning and an evening peak.
 */
export function gridTiedSiteSpec(days: number, stepMinutes: 15 | 60, seed = 5): SiteSpec {
  const perDay = (24 * 60) / stepMinutes;
  const steps = days * perDay;
  const rnd = lcg(seed);
  const load: number[] = [];
  const importPrice: number[] = [];
  const exportPrice: number[] = [];
  for (let t = 0; t < steps; t++) {
    const hour = ((t * stepMinutes) / 60) % 24;
    const peak = (hour >= 7 && hour < 10) || (hour >= 17 && hour < 21);
    load.push(round1(120 + 60 * Math.sin((Math.PI * hour) / 24) + 30 * rnd()));
    importPrice.push(peak ? 0.32 : hour < 6 ? 0.12 : 0.2);
    exportPrice.push(peak ? 0.12 : 0.04);
  }
  return {
    name: `Bench: grid-tied site with battery, ${days} days`,
    horizon: { start: '2027-01-04T00:00:00+01:00', stepMinutes, steps },
    supply: { availableKw: solar(steps, stepMinutes, 600, seed + 1) },
    siteLoad: { kw: load, unservedPenaltyPerKwh: 5 },
    grid: { importLimitKw: 400, exportLimitKw: 250, importPrice, exportPrice },
    units: [
      { id: 'ely-1', kind: 'flexible-load', ratingKw: 300, minStableKw: 90, valuePerKwh: 0.16, startupCost: 12,
        minUpSteps: Math.round(180 / stepMinutes), minDownSteps: Math.round(120 / stepMinutes) },
      { id: 'gen-1', kind: 'generator', ratingKw: 250, minStableKw: 80, costPerKwh: 0.27, startupCost: 20,
        minUpSteps: Math.round(120 / stepMinutes), minDownSteps: Math.round(60 / stepMinutes) },
    ],
    storage: [
      { id: 'bess-1', capacityKwh: 800, maxChargeKw: 200, maxDischargeKw: 200, chargeEfficiency: 0.95, dischargeEfficiency: 0.95,
        minSocKwh: 80, initialSocKwh: 400, finalSocKwh: 400, cycleCostPerKwh: 0.01 },
    ],
    solver: { mode: 'monolithic', mipGap: 1e-3, timeLimitSeconds: 300 },
  };
}

export function gridTiedSite(days: number, stepMinutes: 15 | 60, seed = 5): ResolvedSiteSpec {
  return resolveSpec(gridTiedSiteSpec(days, stepMinutes, seed));
}

/** A small model for the solver comparison and the memory run (hourly, grid-tied). */
export function smallSite(steps: number, seed = 3): ResolvedSiteSpec {
  const full = gridTiedSite(Math.ceil(steps / 24), 60, seed);
  const cut = (xs: number[]) => xs.slice(0, steps);
  return {
    ...full,
    name: `Bench: small grid-tied site, ${steps} steps`,
    horizon: { ...full.horizon, steps },
    supply: { availableKw: cut(full.supply.availableKw) },
    siteLoad: { ...full.siteLoad, kw: cut(full.siteLoad.kw) },
    grid: { ...full.grid, importPrice: cut(full.grid.importPrice), exportPrice: cut(full.grid.exportPrice) },
    solver: { ...full.solver, mipGap: 1e-6 },
  };
}
