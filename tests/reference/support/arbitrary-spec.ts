/**
 * fast-check generators of SMALL valid site specs (≤ 8 steps, ≤ 2 units, ≤ 1 battery, grid
 * optional, prices sometimes negative or equal for import and export). Values are multiples
 * of 0.5 kW and 0.01 money so that ties and degenerate optima occur, which is where wrong
 * formulations tend to show.
 */
import fc from 'fast-check';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import { resolveSpec } from './specs';

export interface ArbitraryOptions {
  /** Force a grid and a battery with prices where doing both directions at once could pay. */
  exclusivityStress?: boolean;
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
  const stress = options.exclusivityStress ?? false;
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
