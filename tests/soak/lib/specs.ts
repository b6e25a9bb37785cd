// Invented sites of our own for the soak runs: a small day-ahead site (the throughput and load
// figures) and a busier one whose solve lasts long enough to be interrupted mid-solve.

/** 24 hourly steps, two units, a battery and a grid connection. */
export function smallSiteSpec(name = 'soak small site'): Record<string, unknown> {
  const steps = 24;
  const sun = Array.from({ length: steps }, (_v, t) => Math.max(0, Math.round(420 * Math.sin((Math.PI * (t - 6)) / 12))));
  return {
    name,
    horizon: { start: '2027-04-12T00:00:00+02:00', stepMinutes: 60, steps },
    supply: { availableKw: sun },
    siteLoad: { kw: Array.from({ length: steps }, (_v, t) => 60 + (t % 6) * 5), unservedPenaltyPerKwh: 4 },
    grid: { importLimitKw: 150, exportLimitKw: 120, importPrice: Array.from({ length: steps }, (_v, t) => (t >= 17 && t <= 21 ? 0.34 : 0.18)), exportPrice: 0.05 },
    units: [
      { id: 'heat-pump-1', kind: 'flexible-load', ratingKw: 180, minStableKw: 60, valuePerKwh: 0.12, startupCost: 3, minUpSteps: 3, minDownSteps: 2 },
      { id: 'chp-1', kind: 'generator', ratingKw: 120, minStableKw: 50, costPerKwh: 0.27, startupCost: 8, minUpSteps: 2, minDownSteps: 2 },
    ],
    storage: [
      { id: 'bess-1', capacityKwh: 400, maxChargeKw: 100, maxDischargeKw: 100, chargeEfficiency: 0.95, dischargeEfficiency: 0.95, minSocKwh: 40, initialSocKwh: 200, finalSocKwh: 200, cycleCostPerKwh: 0.01 },
    ],
    solver: { mode: 'monolithic', timeLimitSeconds: 20 },
  };
}

/** 96 quarter-hours, four units and two batteries at a 1 % gap: a solve of a fraction of a second to a second, long enough to kill a worker inside it. */
export function busySiteSpec(name = 'soak busy site', timeLimitSeconds = 5): Record<string, unknown> {
  const steps = 96;
  const supply = Array.from({ length: steps }, (_v, t) => Math.max(0, Math.round(900 * Math.sin((Math.PI * (t - 24)) / 48) + 60 * Math.sin(t * 1.7))));
  const price = Array.from({ length: steps }, (_v, t) => Number((0.16 + 0.14 * Math.sin((Math.PI * (t - 40)) / 48) + 0.02 * Math.cos(t * 2.3)).toFixed(3)));
  const units = Array.from({ length: 4 }, (_v, i) => ({
    id: `unit-${i + 1}`,
    kind: i % 2 ? 'generator' : 'flexible-load',
    ratingKw: 120 + 40 * i,
    minStableKw: 40 + 10 * i,
    ...(i % 2 ? { costPerKwh: 0.2 + 0.03 * i } : { valuePerKwh: 0.1 + 0.02 * i }),
    startupCost: 5 + i,
    minUpSteps: 4 + (i % 3),
    minDownSteps: 3 + (i % 2),
  }));
  return {
    name,
    horizon: { start: '2027-09-06T00:00:00+02:00', stepMinutes: 15, steps },
    supply: { availableKw: supply },
    siteLoad: { kw: Array.from({ length: steps }, (_v, t) => 120 + 30 * Math.round(Math.sin(t / 7) * 2)), unservedPenaltyPerKwh: 3 },
    grid: { importLimitKw: 400, exportLimitKw: 300, importPrice: price, exportPrice: price.map((p) => Number((p * 0.6).toFixed(3))) },
    units,
    storage: [
      { id: 'bess-a', capacityKwh: 800, maxChargeKw: 250, maxDischargeKw: 250, chargeEfficiency: 0.94, dischargeEfficiency: 0.94, minSocKwh: 80, initialSocKwh: 400, finalSocKwh: 400, cycleCostPerKwh: 0.012 },
      { id: 'bess-b', capacityKwh: 300, maxChargeKw: 150, maxDischargeKw: 150, chargeEfficiency: 0.9, dischargeEfficiency: 0.9, initialSocKwh: 150 },
    ],
    solver: { mode: 'monolithic', timeLimitSeconds, mipGap: 0.01 },
  };
}
