import { resolveDefaults, validateSiteSpec, type ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { exampleSites } from '@gridwright/shared/examples';

/** A small deterministic pseudo-random sequence (LCG), so synthetic sites are the same on every run. */
export function seededRandom(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

export function resolve(input: unknown): ResolvedSiteSpec {
  const v = validateSiteSpec(input);
  if (!v.ok) throw new Error(`invalid test spec: ${JSON.stringify(v.errors)}`);
  return resolveDefaults(v.spec);
}

/**
 * An invented grid-tied site: solar-shaped supply with cloudy days, a daily load curve, day/night
 * import prices, a battery and a flexible process load with minimum up/down times.
 */
export function gridTiedSolarSite(opts: { days: number; stepMinutes: 15 | 60; seed?: number; mode?: 'monolithic' | 'rolling' }): unknown {
  const rand = seededRandom(opts.seed ?? 7);
  const perHour = 60 / opts.stepMinutes;
  const steps = opts.days * 24 * perHour;
  const supply: number[] = [];
  const load: number[] = [];
  const importPrice: number[] = [];
  let cloud = 1;
  for (let t = 0; t < steps; t++) {
    const hour = (t / perHour) % 24;
    if (t % (24 * perHour) === 0) cloud = 0.4 + 0.6 * rand();
    const sun = Math.max(0, Math.sin(((hour - 6) / 12) * Math.PI));
    supply.push(Math.round(600 * sun * cloud * 10) / 10);
    load.push(Math.round((120 + 60 * Math.sin(((hour - 9) / 24) * 2 * Math.PI) + 20 * rand()) * 10) / 10);
    importPrice.push(hour >= 7 && hour < 22 ? 0.28 + 0.04 * rand() : 0.12 + 0.02 * rand());
  }
  return {
    name: 'Synthetic grid-tied solar site',
    horizon: { start: '2027-04-01T00:00:00+02:00', stepMinutes: opts.stepMinutes, steps },
    supply: { availableKw: supply },
    siteLoad: { kw: load },
    grid: { importLimitKw: 400, exportLimitKw: 300, importPrice, exportPrice: 0.06 },
    units: [
      { id: 'chiller', kind: 'flexible-load', ratingKw: 150, minStableKw: 60, valuePerKwh: 0.2, startupCost: 4, minUpSteps: 3 * perHour, minDownSteps: 2 * perHour },
    ],
    storage: [
      { id: 'bess', capacityKwh: 800, maxChargeKw: 250, maxDischargeKw: 250, chargeEfficiency: 0.95, dischargeEfficiency: 0.95, minSocKwh: 80, initialSocKwh: 400, cycleCostPerKwh: 0.01 },
    ],
    solver: { mode: opts.mode ?? 'auto', mipGap: 1e-4 },
  };
}

/** The same kind of site with three units, for the reductions benchmark (a week at 15 minutes, solar only). */
export function solarThreeUnitSite(opts: { days: number; stepMinutes: 15 | 60; seed?: number }): unknown {
  const rand = seededRandom(opts.seed ?? 11);
  const perHour = 60 / opts.stepMinutes;
  const steps = opts.days * 24 * perHour;
  const supply: number[] = [];
  let cloud = 1;
  for (let t = 0; t < steps; t++) {
    const hour = (t / perHour) % 24;
    if (t % (24 * perHour) === 0) cloud = 0.3 + 0.7 * rand();
    const sun = Math.max(0, Math.sin(((hour - 6) / 12) * Math.PI));
    supply.push(Math.round(900 * sun * cloud * (0.85 + 0.15 * rand()) * 10) / 10);
  }
  return {
    horizon: { start: '2027-06-01T00:00:00+02:00', stepMinutes: opts.stepMinutes, steps },
    supply: { availableKw: supply },
    units: [
      { id: 'pump-a', kind: 'flexible-load', ratingKw: 300, minStableKw: 120, valuePerKwh: 0.1, startupCost: 3, minUpSteps: 2 * perHour, minDownSteps: perHour },
      { id: 'pump-b', kind: 'flexible-load', ratingKw: 250, minStableKw: 100, valuePerKwh: 0.09, startupCost: 3, minUpSteps: 2 * perHour, minDownSteps: perHour },
      { id: 'ely', kind: 'flexible-load', ratingKw: 400, minStableKw: 150, valuePerKwh: 0.08, startupCost: 8, minUpSteps: 3 * perHour, minDownSteps: 2 * perHour },
    ],
    storage: [],
  };
}

/** A demo site (shared/examples) over `days` days: every per-step series repeated, with the given solver settings. */
export function repeatedExample(id: string, days: number, solver: Record<string, unknown>): ResolvedSiteSpec {
  const spec = structuredClone(exampleSites.find((e) => e.id === id)!.spec) as any;
  const T = spec.horizon.steps;
  const rep = (a: unknown) => (Array.isArray(a) ? Array.from({ length: T * days }, (_, t) => a[t % T]) : a);
  spec.horizon.steps = T * days;
  spec.supply.availableKw = rep(spec.supply.availableKw);
  if (spec.siteLoad) spec.siteLoad.kw = rep(spec.siteLoad.kw);
  if (spec.grid) {
    spec.grid.importPrice = rep(spec.grid.importPrice);
    spec.grid.exportPrice = rep(spec.grid.exportPrice);
  }
  if (spec.reserve) spec.reserve.upKw = rep(spec.reserve.upKw);
  for (const s of spec.stores ?? []) {
    s.demandPerHour = rep(s.demandPerHour);
    s.inflowPerHour = rep(s.inflowPerHour);
  }
  spec.solver = solver;
  return resolve(spec);
}
