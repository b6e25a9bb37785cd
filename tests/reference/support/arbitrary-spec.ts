/**
 * fast-check generators of SMALL valid site specs (≤ 8 steps, ≤ 2 units, ≤ 1 battery, grid
 * optional, prices sometimes negative or equal for import and export). Values are multiples
 * of 0.5 kW and 0.01 money so that ties and degenerate optima occur, which is where wrong
 * formulations tend to show. With `extensions`, the SPEC §5 parts are added on top (see
 * `withSiteExtensions`).
 */
import fc from 'fast-check';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { resolveSpec } from './specs';

export interface ArbitraryOptions {
  /** Force a grid and a battery with prices where doing both directions at once could pay. */
  exclusivityStress?: boolean;
  /** Add SPEC §5 parts: curves, no-load, hot/cold starts, ramps, reserve, demand charges, supply-only charging, stores. */
  extensions?: boolean;
}

const kw = (max: number) => fc.integer({ min: 0, max: max * 2 }).map((x) => x / 2);
const price = (min: number, max: number) => fc.integer({ min: Math.round(min * 100), max: Math.round(max * 100) }).map((x) => x / 100);

function series<T>(steps: number, item: fc.Arbitrary<T>) {
  return fc.array(item, { minLength: steps, maxLength: steps });
}

function priceInput(steps: number, min: number, max: number) {
  return fc.oneof(price(min, max), series(steps, price(min, max)));
}

const unit = (steps: number) =>
  fc.record({
    kind: fc.constantFrom('flexible-load' as const, 'generator' as const),
    ratingKw: fc.integer({ min: 2, max: 400 }).map((x) => x / 2),
    minStableShare: fc.constantFrom(0, 0.25, 0.5, 0.8, 1),
    money: price(0, 0.5),
    startupCost: fc.constantFrom(0, 1, 5, 20),
    minUpSteps: fc.integer({ min: 1, max: Math.min(4, steps + 1) }),
    minDownSteps: fc.integer({ min: 1, max: Math.min(4, steps + 1) }),
    initial: fc.option(fc.record({ on: fc.boolean(), stepsInState: fc.option(fc.integer({ min: 0, max: 5 }), { nil: undefined }) }), { nil: undefined }),
  });

const battery = fc.record({
  capacityKwh: fc.integer({ min: 2, max: 800 }).map((x) => x / 2),
  maxChargeKw: kw(150),
  maxDischargeKw: kw(150),
  chargeEfficiency: fc.constantFrom(1, 0.95, 0.9, 0.8),
  dischargeEfficiency: fc.constantFrom(1, 0.95, 0.9, 0.8),
  minShare: fc.constantFrom(0, 0.1, 0.2),
  initialShare: fc.constantFrom(0, 0.3, 0.5, 1),
  finalShare: fc.option(fc.constantFrom(0, 0.2, 0.5, 0.9), { nil: undefined }),
  cycleCostPerKwh: fc.constantFrom(0, 0.01, 0.05),
});

/** Raw JSON site specs (what a client would POST). */
export function arbitrarySiteSpecInput(options: ArbitraryOptions = {}): fc.Arbitrary<Record<string, unknown>> {
  const base = arbitraryV1SpecInput(options.exclusivityStress ?? false);
  return options.extensions ? base.chain(withSiteExtensions) : base;
}

function arbitraryV1SpecInput(stress: boolean): fc.Arbitrary<Record<string, unknown>> {
  return fc
    .record({
      steps: fc.integer({ min: 1, max: 8 }),
      stepMinutes: fc.constantFrom(15, 30, 60),
    })
    .chain(({ steps, stepMinutes }) =>
      fc.record({
        steps: fc.constant(steps),
        stepMinutes: fc.constant(stepMinutes),
        supply: series(steps, kw(200)),
        load: fc.option(fc.record({ kw: series(steps, kw(100)), penalty: fc.option(price(0, 20), { nil: undefined }) }), { nil: undefined }),
        grid: stress
          ? fc.record({
              importLimitKw: kw(300).map((x) => x + 1),
              exportLimitKw: kw(300).map((x) => x + 1),
              importPrice: priceInput(steps, -0.2, 0.3),
              exportPrice: priceInput(steps, -0.1, 0.3),
              samePrices: fc.boolean(),
            })
          : fc.option(
              fc.record({
                importLimitKw: kw(300),
                exportLimitKw: kw(300),
                importPrice: priceInput(steps, -0.1, 0.5),
                exportPrice: priceInput(steps, -0.05, 0.4),
                samePrices: fc.boolean(),
              }),
              { nil: undefined },
            ),
        units: fc.array(unit(steps), { minLength: 0, maxLength: 2 }),
        storage: stress ? fc.array(battery, { minLength: 1, maxLength: 1 }) : fc.array(battery, { minLength: 0, maxLength: 1 }),
      }),
    )
    .map((r) => {
      const spec: Record<string, unknown> = {
        horizon: { start: '2027-06-01T00:00:00+02:00', stepMinutes: r.stepMinutes, steps: r.steps },
        supply: { availableKw: r.supply },
        units: r.units.map((u, i) => ({
          id: `u${i}`,
          kind: u.kind,
          ratingKw: u.ratingKw,
          minStableKw: Math.round(u.ratingKw * u.minStableShare * 2) / 2,
          ...(u.kind === 'generator' ? { costPerKwh: u.money } : { valuePerKwh: u.money }),
          startupCost: u.startupCost,
          minUpSteps: u.minUpSteps,
          minDownSteps: u.minDownSteps,
          ...(u.initial ? { initial: u.initial.stepsInState === undefined ? { on: u.initial.on } : u.initial } : {}),
        })),
        storage: r.storage.map((b, j) => {
          const minSocKwh = Math.round(b.capacityKwh * b.minShare * 2) / 2;
          const initialSocKwh = Math.max(minSocKwh, Math.round(b.capacityKwh * b.initialShare * 2) / 2);
          return {
            id: `b${j}`,
            capacityKwh: b.capacityKwh,
            maxChargeKw: b.maxChargeKw,
            maxDischargeKw: b.maxDischargeKw,
            chargeEfficiency: b.chargeEfficiency,
            dischargeEfficiency: b.dischargeEfficiency,
            minSocKwh,
            initialSocKwh,
            ...(b.finalShare !== undefined ? { finalSocKwh: Math.max(minSocKwh, Math.round(b.capacityKwh * b.finalShare * 2) / 2) } : {}),
            cycleCostPerKwh: b.cycleCostPerKwh,
          };
        }),
        solver: { mode: 'monolithic', mipGap: 1e-9, timeLimitSeconds: 30 },
      };
      if (r.load) spec.siteLoad = { kw: r.load.kw, ...(r.load.penalty !== undefined ? { unservedPenaltyPerKwh: r.load.penalty } : {}) };
      if (r.grid) {
        spec.grid = {
          importLimitKw: r.grid.importLimitKw,
          exportLimitKw: r.grid.exportLimitKw,
          importPrice: r.grid.importPrice,
          exportPrice: r.grid.samePrices ? r.grid.importPrice : r.grid.exportPrice,
        };
      }
      return spec;
    });
}

export function arbitraryResolvedSpec(options: ArbitraryOptions = {}): fc.Arbitrary<ResolvedSiteSpec> {
  return arbitrarySiteSpecInput(options).map(resolveSpec);
}

type SpecInput = Record<string, unknown>;
type UnitInput = { id: string; kind: 'generator' | 'flexible-load'; ratingKw: number; minStableKw: number; costPerKwh?: number; valuePerKwh?: number } & Record<string, unknown>;

/**
 * Starts and zones where local time is interesting: the spring and autumn daylight-saving
 * changes in Vienna, a Friday evening that runs into Saturday, a half-hour zone, a zone whose
 * name has its sign inverted, and no zone (the start's own offset).
 */
const HORIZON_STARTS = [
  { start: '2027-03-28T00:00:00+01:00', timeZone: 'Europe/Vienna' },
  { start: '2027-10-31T01:00:00+02:00', timeZone: 'Europe/Vienna' },
  { start: '2027-06-04T21:00:00-04:00', timeZone: 'America/New_York' },
  { start: '2027-06-07T16:30:00+05:30', timeZone: 'Asia/Kolkata' },
  { start: '2027-03-03T16:00:00+01:00', timeZone: 'Etc/GMT-1' },
  { start: '2027-06-05T22:00:00+02:00', timeZone: undefined },
];
const CLOCK_FROM = ['00:00', '01:30', '07:00', '17:00', '21:45', '23:00'];
const CLOCK_TO = ['00:00', '02:15', '07:00', '18:30', '22:00', '24:00'];

const share = fc.constantFrom(0, 0.25, 0.5, 0.75, 1);
const round2 = (x: number) => Math.round(x * 2) / 2;

/** A slice of a curve: where it ends (share of the rating) and its price step from the slice before. */
const curveArb = fc.array(fc.record({ end: fc.constantFrom(0.2, 0.4, 0.5, 0.7, 0.9), rise: price(0, 0.2) }), { minLength: 1, maxLength: 3 });

const unitExtrasArb = fc.record({
  curve: fc.option(curveArb, { nil: undefined }),
  noLoadCostPerHour: fc.constantFrom(0, 0, 1, 5, 20),
  startupCost: fc.option(fc.record({ hot: fc.constantFrom(0, 1, 5), extra: fc.constantFrom(0, 2, 10, 30), coldAfterSteps: fc.integer({ min: 0, max: 4 }) }), { nil: undefined }),
  rampUpKwPerMin: fc.option(fc.constantFrom(0, 0.5, 1, 2, 5), { nil: undefined }),
  rampDownKwPerMin: fc.option(fc.constantFrom(0, 0.5, 1, 2, 5), { nil: undefined }),
  initial: fc.option(fc.record({ on: fc.boolean(), stepsInState: fc.option(fc.integer({ min: 0, max: 5 }), { nil: undefined }), powerShare: fc.option(share, { nil: undefined }) }), { nil: undefined }),
  providesReserve: fc.option(fc.boolean(), { nil: undefined }),
  link: fc.option(fc.record({ direction: fc.constantFrom('produces' as const, 'consumes' as const), store: fc.nat(), perKwh: fc.constantFrom(0.5, 1, 2) }), { nil: undefined }),
});

const storeArb = (steps: number) =>
  fc.record({
    capacity: fc.integer({ min: 2, max: 400 }).map((x) => x / 2),
    minShare: fc.constantFrom(0, 0.1, 0.3),
    initialShare: fc.constantFrom(0, 0.5, 1),
    finalShare: fc.option(fc.constantFrom(0, 0.3, 0.6), { nil: undefined }),
    demandPerHour: fc.oneof(kw(40), series(steps, kw(40))),
    lossPerHour: fc.constantFrom(0, 0.05, 0.1),
    shortfallPenaltyPerUnit: fc.option(fc.constantFrom(0, 0.5, 5, 50), { nil: undefined }),
    spillAllowed: fc.boolean(),
  });

const demandChargeArb = fc.record({
  pricePerKw: fc.constantFrom(0.5, 5, 20),
  window: fc.option(
    fc.record({
      daysOfWeek: fc.option(fc.uniqueArray(fc.integer({ min: 1, max: 7 }), { minLength: 1, maxLength: 7 }), { nil: undefined }),
      from: fc.option(fc.constantFrom(...CLOCK_FROM), { nil: undefined }),
      to: fc.option(fc.constantFrom(...CLOCK_TO), { nil: undefined }),
    }),
    { nil: undefined },
  ),
  existingPeakKw: fc.option(kw(150), { nil: undefined }),
});

/** A v1 spec with SPEC §5 parts added: every one optional, so each appears alone and with the others. */
function withSiteExtensions(spec: SpecInput): fc.Arbitrary<SpecInput> {
  const horizon = spec.horizon as { stepMinutes: number; steps: number };
  const steps = horizon.steps;
  const units = spec.units as UnitInput[];
  const batteries = spec.storage as Record<string, unknown>[];
  return fc
    .record({
      when: fc.constantFrom(...HORIZON_STARTS),
      units: fc.tuple(...units.map(() => unitExtrasArb)),
      batteries: fc.tuple(...batteries.map(() => fc.record({ chargeFromSupplyOnly: fc.boolean(), providesReserve: fc.option(fc.boolean(), { nil: undefined }) }))),
      stores: fc.array(storeArb(steps), { minLength: 0, maxLength: 2 }),
      reserve: fc.option(fc.record({ upKw: fc.oneof(kw(60), series(steps, kw(60))), penalty: fc.option(fc.constantFrom(0, 0.2, 2), { nil: undefined }) }), { nil: undefined }),
      demandCharges: fc.array(demandChargeArb, { minLength: 0, maxLength: 2 }),
    })
    .map((x) => {
      const stores = x.stores.map((st, m) => {
        const min = round2(st.capacity * st.minShare);
        return {
          id: `s${m}`,
          capacity: st.capacity,
          min,
          initial: Math.max(min, round2(st.capacity * st.initialShare)),
          ...(st.finalShare !== undefined ? { final: Math.max(min, round2(st.capacity * st.finalShare)) } : {}),
          demandPerHour: st.demandPerHour,
          lossPerHour: st.lossPerHour,
          ...(st.shortfallPenaltyPerUnit !== undefined ? { shortfallPenaltyPerUnit: st.shortfallPenaltyPerUnit } : {}),
          spillAllowed: st.spillAllowed,
        };
      });
      const out: SpecInput = {
        ...spec,
        horizon: { ...(spec.horizon as object), start: x.when.start, ...(x.when.timeZone ? { timeZone: x.when.timeZone } : {}) },
        units: units.map((unit, i) => extendUnit(unit, x.units[i], stores.length)),
        storage: batteries.map((b, j) => ({
          ...b,
          chargeFromSupplyOnly: x.batteries[j].chargeFromSupplyOnly,
          ...(x.batteries[j].providesReserve !== undefined ? { providesReserve: x.batteries[j].providesReserve } : {}),
        })),
        stores,
      };
      if (x.reserve) out.reserve = { upKw: x.reserve.upKw, ...(x.reserve.penalty !== undefined ? { shortfallPenaltyPerKwh: x.reserve.penalty } : {}) };
      if (spec.grid && x.demandCharges.length > 0) {
        out.grid = {
          ...(spec.grid as object),
          demandCharges: x.demandCharges.map((c, k) => ({
            id: `dc${k}`,
            pricePerKw: c.pricePerKw,
            ...(c.window ? { window: Object.fromEntries(Object.entries(c.window).filter(([, value]) => value !== undefined)) } : {}),
            ...(c.existingPeakKw !== undefined ? { existingPeakKw: c.existingPeakKw } : {}),
          })),
        };
      }
      return out;
    });
}

function extendUnit(unit: UnitInput, x: UnitExtras, storeCount: number): UnitInput {
  const { costPerKwh, valuePerKwh, ...rest } = unit;
  const out: UnitInput = { ...rest, noLoadCostPerHour: x.noLoadCostPerHour };
  const single = unit.kind === 'generator' ? costPerKwh : valuePerKwh;
  if (x.curve) {
    // Ends rising strictly to the rating; prices stepping up (costs) or down (values) from the single figure.
    const ends = [...new Set(x.curve.map((slice) => round2(slice.end * unit.ratingKw)))].filter((end) => end > 0 && end < unit.ratingKw).sort((a, b) => a - b);
    let level = single ?? 0;
    const slices = [...ends, unit.ratingKw].map((upToKw, k) => {
      level = Math.round((level + (k === 0 ? 0 : (unit.kind === 'generator' ? 1 : -1) * x.curve![k - 1].rise)) * 100) / 100;
      return unit.kind === 'generator' ? { upToKw, costPerKwh: level } : { upToKw, valuePerKwh: level };
    });
    if (unit.kind === 'generator') out.costCurve = slices;
    else out.valueCurve = slices;
  } else if (single !== undefined) {
    out[unit.kind === 'generator' ? 'costPerKwh' : 'valuePerKwh'] = single;
  }
  if (x.startupCost) out.startupCost = { hot: x.startupCost.hot, cold: x.startupCost.hot + x.startupCost.extra, coldAfterSteps: x.startupCost.coldAfterSteps };
  if (x.rampUpKwPerMin !== undefined) out.rampUpKwPerMin = x.rampUpKwPerMin;
  if (x.rampDownKwPerMin !== undefined) out.rampDownKwPerMin = x.rampDownKwPerMin;
  if (x.initial) {
    const powerKw = x.initial.on && x.initial.powerShare !== undefined
      ? Math.max(unit.minStableKw, round2(unit.ratingKw * x.initial.powerShare))
      : undefined;
    out.initial = {
      on: x.initial.on,
      ...(x.initial.stepsInState !== undefined ? { stepsInState: x.initial.stepsInState } : {}),
      ...(powerKw !== undefined ? { powerKw: Math.min(powerKw, unit.ratingKw) } : {}),
    };
  }
  if (x.providesReserve !== undefined) out.providesReserve = x.providesReserve;
  if (x.link && storeCount > 0) out[x.link.direction] = { store: `s${x.link.store % storeCount}`, perKwh: x.link.perKwh };
  return out;
}

type UnitExtras = typeof unitExtrasArb extends fc.Arbitrary<infer T> ? T : never;
