/**
 * Invented day-ahead sites for the bench's engine-vs-CBC section: 48–72 steps, a few units and a
 * battery each, one with negative prices, three with parts of the v1.1 model. Generated
 * deterministically, so every run of `npm run bench` solves the same models.
 */
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { resolveSpec } from '../reference/support/specs';
import { lcg, round1, solar } from './sites';

/** Hour of day of step t on a horizon that starts at midnight. */
const hourOf = (t: number, stepMinutes: number) => ((t * stepMinutes) / 60) % 24;

/** A cold store by a harbour: compressors that may pre-cool on cheap or solar energy, a backup genset, a battery; 48 hourly steps. */
function harbourColdStore(): ResolvedSiteSpec {
  const steps = 48;
  const rnd = lcg(21);
  const load = Array.from({ length: steps }, (_, t) => round1(60 + 25 * Math.sin((Math.PI * hourOf(t, 60)) / 24) + 10 * rnd()));
  const importPrice = Array.from({ length: steps }, (_, t) => {
    const h = hourOf(t, 60);
    return h >= 17 && h < 21 ? 0.34 : h >= 7 && h < 17 ? 0.22 : 0.11;
  });
  return resolveSpec({
    name: 'Day-ahead: harbour cold store',
    horizon: { start: '2027-05-10T00:00:00+02:00', stepMinutes: 60, steps },
    supply: { availableKw: solar(steps, 60, 320, 22) },
    siteLoad: { kw: load, unservedPenaltyPerKwh: 4 },
    grid: { importLimitKw: 250, exportLimitKw: 120, importPrice, exportPrice: 0.05 },
    units: [
      { id: 'compressor-a', kind: 'flexible-load', ratingKw: 110, minStableKw: 45, valuePerKwh: 0.2, startupCost: 3, minUpSteps: 3, minDownSteps: 2 },
      { id: 'compressor-b', kind: 'flexible-load', ratingKw: 80, minStableKw: 30, valuePerKwh: 0.17, startupCost: 2, minUpSteps: 2, minDownSteps: 2 },
      { id: 'backup-genset', kind: 'generator', ratingKw: 150, minStableKw: 50, costPerKwh: 0.3, startupCost: 15, minUpSteps: 2, minDownSteps: 2 },
    ],
    storage: [
      { id: 'bess', capacityKwh: 300, maxChargeKw: 120, maxDischargeKw: 120, chargeEfficiency: 0.95, dischargeEfficiency: 0.95,
        minSocKwh: 30, initialSocKwh: 150, finalSocKwh: 150, cycleCostPerKwh: 0.01 },
    ],
    solver: { mode: 'monolithic' },
  });
}

/**
 * A wind farm selling day-ahead, three days hourly: midday and windy night prices go negative,
 * an electric boiler soaks up power and a battery arbitrages; importing is paid for at the
 * negative hours, so the grid and battery exclusivity binaries stay.
 */
function windNegativePrices(): ResolvedSiteSpec {
  const steps = 72;
  const rnd = lcg(31);
  const wind: number[] = [];
  let w = 0.6;
  for (let t = 0; t < steps; t++) {
    w = Math.min(1, Math.max(0.05, w + 0.18 * (rnd() - 0.5)));
    wind.push(round1(1800 * w));
  }
  const exportPrice = Array.from({ length: steps }, (_, t) => {
    const h = hourOf(t, 60);
    const base = h >= 17 && h < 21 ? 0.14 : h >= 7 && h < 17 ? 0.06 : 0.03;
    const glut = h >= 11 && h < 15 ? -0.06 : h >= 1 && h < 5 && t > 24 ? -0.02 : 0;
    return Math.round((base + glut + 0.02 * rnd()) * 1000) / 1000;
  });
  return resolveSpec({
    name: 'Day-ahead: wind farm at negative prices',
    horizon: { start: '2027-03-22T00:00:00+01:00', stepMinutes: 60, steps },
    supply: { availableKw: wind },
    siteLoad: { kw: Array.from({ length: steps }, () => 40) },
    grid: { importLimitKw: 600, exportLimitKw: 1500, importPrice: exportPrice.map((p) => Math.round((p + 0.025) * 1000) / 1000), exportPrice },
    units: [
      { id: 'e-boiler', kind: 'flexible-load', ratingKw: 700, minStableKw: 200, valuePerKwh: 0.035, startupCost: 10, minUpSteps: 2, minDownSteps: 2 },
      { id: 'heat-pump', kind: 'flexible-load', ratingKw: 250, minStableKw: 100, valuePerKwh: 0.07, startupCost: 4, minUpSteps: 3, minDownSteps: 2 },
    ],
    storage: [
      { id: 'bess', capacityKwh: 2000, maxChargeKw: 800, maxDischargeKw: 800, chargeEfficiency: 0.93, dischargeEfficiency: 0.93,
        minSocKwh: 200, initialSocKwh: 1000, finalSocKwh: 1000, cycleCostPerKwh: 0.008 },
    ],
    solver: { mode: 'monolithic' },
  });
}

/** A resort island: solar, a battery and two gensets with no-load costs, cost curves, hot and cold starts and spinning reserve; 48 hourly steps. */
function islandResort(): ResolvedSiteSpec {
  const steps = 48;
  const rnd = lcg(41);
  const load = Array.from({ length: steps }, (_, t) => {
    const h = hourOf(t, 60);
    return round1(90 + (h >= 18 && h < 23 ? 70 : h >= 7 && h < 18 ? 35 : 0) + 12 * rnd());
  });
  return resolveSpec({
    name: 'Day-ahead: resort island',
    horizon: { start: '2027-01-18T00:00:00-04:00', stepMinutes: 60, steps, timeZone: 'America/Caracas' },
    supply: { availableKw: solar(steps, 60, 260, 42) },
    siteLoad: { kw: load, unservedPenaltyPerKwh: 3 },
    units: [
      { id: 'genset-1', kind: 'generator', ratingKw: 160, minStableKw: 55, noLoadCostPerHour: 8,
        costCurve: [{ upToKw: 100, costPerKwh: 0.25 }, { upToKw: 160, costPerKwh: 0.28 }],
        startupCost: { hot: 6, cold: 15, coldAfterSteps: 4 }, minUpSteps: 3, minDownSteps: 2, initial: { on: true, stepsInState: 5, powerKw: 90 } },
      { id: 'genset-2', kind: 'generator', ratingKw: 100, minStableKw: 35, noLoadCostPerHour: 6,
        costCurve: [{ upToKw: 60, costPerKwh: 0.27 }, { upToKw: 100, costPerKwh: 0.3 }],
        startupCost: { hot: 4, cold: 10, coldAfterSteps: 3 }, minUpSteps: 2, minDownSteps: 2 },
    ],
    storage: [
      { id: 'bess', capacityKwh: 350, maxChargeKw: 120, maxDischargeKw: 120, chargeEfficiency: 0.95, dischargeEfficiency: 0.95,
        minSocKwh: 50, initialSocKwh: 180, finalSocKwh: 180, cycleCostPerKwh: 0.015 },
    ],
    reserve: { upKw: 40 },
    solver: { mode: 'monolithic' },
  });
}

/**
 * A dairy farm, one day at 30 minutes: solar, a battery, a biogas engine that also heats a hot-water
 * store the milk plant draws from (an electric heater tops it up), and a weekday demand charge.
 */
function dairyDemandCharge(): ResolvedSiteSpec {
  const steps = 48;
  const rnd = lcg(51);
  const load = Array.from({ length: steps }, (_, t) => {
    const h = hourOf(t, 30);
    const milking = (h >= 5 && h < 8) || (h >= 16 && h < 19);
    return round1(55 + (milking ? 90 : 0) + 15 * rnd());
  });
  const heatDemand = Array.from({ length: steps }, (_, t) => {
    const h = hourOf(t, 30);
    return (h >= 5 && h < 9) || (h >= 16 && h < 20) ? 60 : 15;
  });
  return resolveSpec({
    name: 'Day-ahead: dairy farm with a demand charge',
    horizon: { start: '2027-04-06T00:00:00+02:00', stepMinutes: 30, steps, timeZone: 'Europe/Amsterdam' },
    supply: { availableKw: solar(steps, 30, 180, 52) },
    siteLoad: { kw: load },
    grid: {
      importLimitKw: 220, exportLimitKw: 100,
      importPrice: Array.from({ length: steps }, (_, t) => (hourOf(t, 30) >= 7 && hourOf(t, 30) < 22 ? 0.24 : 0.13)),
      exportPrice: 0.04,
      demandCharges: [{ id: 'weekday-peak', pricePerKw: 6.5, window: { daysOfWeek: [1, 2, 3, 4, 5], from: '07:00', to: '21:00' }, existingPeakKw: 90 }],
    },
    units: [
      { id: 'biogas-engine', kind: 'generator', ratingKw: 75, minStableKw: 35, costPerKwh: 0.16, noLoadCostPerHour: 2, startupCost: 3,
        minUpSteps: 4, minDownSteps: 2, produces: { store: 'hot-water', perKwh: 1.1 } },
      { id: 'water-heater', kind: 'flexible-load', ratingKw: 60, minStableKw: 20, minUpSteps: 2, produces: { store: 'hot-water', perKwh: 0.95 } },
    ],
    storage: [
      { id: 'bess', capacityKwh: 200, maxChargeKw: 80, maxDischargeKw: 80, chargeEfficiency: 0.95, dischargeEfficiency: 0.95,
        minSocKwh: 20, initialSocKwh: 100, finalSocKwh: 100, cycleCostPerKwh: 0.01 },
    ],
    stores: [{ id: 'hot-water', product: 'heat', unit: 'kWh', capacity: 600, min: 80, initial: 300, final: 300, demandPerHour: heatDemand, lossPerHour: 0.01 }],
    solver: { mode: 'monolithic' },
  });
}

/**
 * Irrigation pumps, 36 hours at 30 minutes: two pumps fill a reservoir against the irrigation
 * draw, from solar, a battery that charges from the panels only, and the grid; the pumps ramp.
 */
function irrigationPumps(): ResolvedSiteSpec {
  const steps = 72;
  const draw = Array.from({ length: steps }, (_, t) => {
    const h = hourOf(t, 30);
    return h >= 19 || h < 6 ? 140 : 40;
  });
  return resolveSpec({
    name: 'Day-ahead: irrigation pumps and a reservoir',
    horizon: { start: '2027-07-19T00:00:00+02:00', stepMinutes: 30, steps, timeZone: 'Europe/Rome' },
    supply: { availableKw: solar(steps, 30, 210, 62) },
    grid: {
      importLimitKw: 110, exportLimitKw: 60,
      importPrice: Array.from({ length: steps }, (_, t) => (hourOf(t, 30) >= 8 && hourOf(t, 30) < 20 ? 0.26 : 0.14)),
      exportPrice: 0.03,
    },
    units: [
      { id: 'pump-1', kind: 'flexible-load', ratingKw: 80, minStableKw: 35, startupCost: 1.5, minUpSteps: 2, minDownSteps: 2,
        rampUpKwPerMin: 1.5, rampDownKwPerMin: 3, produces: { store: 'reservoir', perKwh: 2.4 } },
      { id: 'pump-2', kind: 'flexible-load', ratingKw: 50, minStableKw: 20, startupCost: 1, minUpSteps: 2,
        produces: { store: 'reservoir', perKwh: 2.0 } },
    ],
    storage: [
      { id: 'bess', capacityKwh: 180, maxChargeKw: 70, maxDischargeKw: 70, chargeEfficiency: 0.95, dischargeEfficiency: 0.95,
        minSocKwh: 20, initialSocKwh: 60, finalSocKwh: 60, chargeFromSupplyOnly: true },
    ],
    stores: [{ id: 'reservoir', product: 'water', unit: 'm3', capacity: 1800, min: 250, initial: 800, final: 800, demandPerHour: draw, lossPerHour: 0.001 }],
    solver: { mode: 'monolithic' },
  });
}

export interface DayAheadSite {
  name: string;
  spec: ResolvedSiteSpec;
}

/** The day-ahead set, in the order the bench reports them. */
export function dayAheadSites(): DayAheadSite[] {
  return [
    { name: 'harbour cold store (48 × 60 min)', spec: harbourColdStore() },
    { name: 'wind farm, negative prices (72 × 60 min)', spec: windNegativePrices() },
    { name: 'resort island, v1.1 gensets and reserve (48 × 60 min)', spec: islandResort() },
    { name: 'dairy farm, demand charge and heat store (48 × 30 min)', spec: dairyDemandCharge() },
    { name: 'irrigation pumps, reservoir and ramps (72 × 30 min)', spec: irrigationPumps() },
  ];
}
