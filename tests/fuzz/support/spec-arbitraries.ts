// fast-check generators for site specs: small valid ones (for the engine and as seeds to mutate)
// and hostile bodies built from them (for the HTTP surface).
import fc from 'fast-check';

const STEP_MINUTES = [5, 10, 15, 30, 60] as const;
/**
 * Numbers as integrators send them: a fixed number of decimals within the range. (Arbitrary
 * doubles — denormals, 1e-300 — are a separate, hostile case: see `extremeMagnitudesArb`.)
 */
const decimal = (min: number, max: number, decimals = 2) =>
  fc.integer({ min: Math.ceil(min * 10 ** decimals), max: Math.floor(max * 10 ** decimals) }).map((n) => n / 10 ** decimals);
const kw = (max: number) => decimal(0, max, 1);
const money = decimal(-1, 1, 3);
const assetId = fc.stringMatching(/^[a-z][a-z0-9-]{0,10}$/);

const startArb = fc.constantFrom('2027-03-01T00:00:00+01:00', '2027-10-31T00:00:00+02:00', '2028-01-01T00:00:00Z', '2027-06-15T12:30:00-05:00');

function unitArb(steps: number) {
  return fc
    .record({
      kind: fc.constantFrom('flexible-load' as const, 'generator' as const),
      ratingKw: decimal(1, 500, 1),
      stableShare: decimal(0, 1, 2),
      price: decimal(0, 0.5, 3),
      startupCost: fc.option(decimal(0, 50, 1), { nil: undefined }),
      minUpSteps: fc.option(fc.integer({ min: 1, max: steps + 1 }), { nil: undefined }),
      minDownSteps: fc.option(fc.integer({ min: 1, max: steps + 1 }), { nil: undefined }),
      initial: fc.option(fc.record({ on: fc.boolean(), stepsInState: fc.option(fc.integer({ min: 0, max: 6 }), { nil: undefined }) }), { nil: undefined }),
    })
    .map((u) => ({
      kind: u.kind,
      ratingKw: u.ratingKw,
      minStableKw: Math.round(u.ratingKw * u.stableShare * 10) / 10,
      ...(u.kind === 'generator' ? { costPerKwh: u.price } : { valuePerKwh: u.price }),
      ...(u.startupCost !== undefined ? { startupCost: u.startupCost } : {}),
      ...(u.minUpSteps !== undefined ? { minUpSteps: u.minUpSteps } : {}),
      ...(u.minDownSteps !== undefined ? { minDownSteps: u.minDownSteps } : {}),
      ...(u.initial ? { initial: u.initial.stepsInState === undefined ? { on: u.initial.on } : u.initial } : {}),
    }));
}

const storageArb = fc
  .record({
    capacityKwh: decimal(1, 1000, 1),
    maxChargeKw: kw(300),
    maxDischargeKw: kw(300),
    chargeEfficiency: decimal(0.5, 1, 2),
    dischargeEfficiency: decimal(0.5, 1, 2),
    minShare: decimal(0, 0.3, 2),
    initialShare: decimal(0.3, 1, 2),
    finalShare: fc.option(decimal(0, 1, 2), { nil: undefined }),
    cycleCostPerKwh: decimal(0, 0.05, 3),
  })
  .map((s) => {
    const round = (x: number) => Math.round(x * 10) / 10;
    const minSocKwh = round(s.capacityKwh * s.minShare);
    const span = s.capacityKwh - minSocKwh;
    return {
      capacityKwh: s.capacityKwh,
      maxChargeKw: s.maxChargeKw,
      maxDischargeKw: s.maxDischargeKw,
      chargeEfficiency: s.chargeEfficiency,
      dischargeEfficiency: s.dischargeEfficiency,
      minSocKwh,
      initialSocKwh: Math.min(s.capacityKwh, round(minSocKwh + span * s.initialShare)),
      ...(s.finalShare !== undefined ? { finalSocKwh: Math.min(s.capacityKwh, round(minSocKwh + span * s.finalShare)) } : {}),
      cycleCostPerKwh: s.cycleCostPerKwh,
    };
  });

/** A valid site spec (SPEC.md §1) of at most `maxSteps` steps, 3 units and 2 batteries: solves in well under a second. */
export function validSpecArb(maxSteps = 12) {
  return fc.integer({ min: 1, max: maxSteps }).chain((steps) =>
    fc
      .record({
        name: fc.option(fc.string({ maxLength: 40 }), { nil: undefined }),
        start: startArb,
        stepMinutes: fc.constantFrom(...STEP_MINUTES),
        supply: fc.array(kw(400), { minLength: steps, maxLength: steps }),
        load: fc.option(
          fc.record({ kw: fc.array(kw(200), { minLength: steps, maxLength: steps }), penalty: fc.option(decimal(0, 10, 2), { nil: undefined }) }),
          { nil: undefined },
        ),
        grid: fc.option(
          fc.record({
            importLimitKw: kw(300),
            exportLimitKw: kw(300),
            importPrice: fc.oneof(money, fc.array(money, { minLength: steps, maxLength: steps })),
            exportPrice: fc.oneof(money, fc.array(money, { minLength: steps, maxLength: steps })),
          }),
          { nil: undefined },
        ),
        units: fc.array(unitArb(steps), { maxLength: 3 }),
        storage: fc.array(storageArb, { maxLength: 2 }),
        ids: fc.uniqueArray(assetId, { minLength: 5, maxLength: 5 }),
        mode: fc.constantFrom('auto' as const, 'monolithic' as const, 'rolling' as const),
        window: fc.record({ windowSteps: fc.integer({ min: 1, max: steps + 2 }), commitShare: decimal(0.01, 1, 2) }),
        reductions: fc.record({ sparseSets: fc.boolean(), tightBigM: fc.boolean(), scaling: fc.boolean(), relaxExclusivity: fc.boolean(), independentBlocks: fc.boolean() }),
      })
      .map((r) => ({
        ...(r.name !== undefined ? { name: r.name } : {}),
        horizon: { start: r.start, stepMinutes: r.stepMinutes, steps },
        supply: { availableKw: r.supply },
        ...(r.load ? { siteLoad: { kw: r.load.kw, ...(r.load.penalty !== undefined ? { unservedPenaltyPerKwh: r.load.penalty } : {}) } } : {}),
        ...(r.grid ? { grid: r.grid } : {}),
        units: r.units.map((u, i) => ({ id: r.ids[i], ...u })),
        storage: r.storage.map((s, i) => ({ id: r.ids[3 + i], ...s })),
        solver: {
          mode: r.mode,
          ...(r.mode === 'rolling'
            ? { window: { windowSteps: r.window.windowSteps, commitSteps: Math.max(1, Math.floor(r.window.windowSteps * r.window.commitShare)) } }
            : {}),
          timeLimitSeconds: 10,
          reductions: r.reductions,
        },
      })),
  );
}

export type JsonValue = null | boolean | number | string | JsonValue[] | { [k: string]: JsonValue };

/** Values that are wrong in type or range almost anywhere in a spec. */
export const hostileValue: fc.Arbitrary<unknown> = fc.oneof(
  fc.constantFrom<unknown>('NaN', 'Infinity', '-Infinity', '1e309', '', '0x10', ' 12 ', null, true, false, [], {}, -1, 0, -0, 1e308, -1e308, 2 ** 53 + 1, 5e-324),
  fc.string({ maxLength: 20 }),
  fc.string({ unit: 'binary', maxLength: 20 }),
  fc.integer(),
  fc.double(),
  fc.array(fc.anything({ maxDepth: 2 }), { maxLength: 5 }),
  fc.dictionary(fc.string({ maxLength: 8 }), fc.anything({ maxDepth: 1 }), { maxKeys: 4 }),
  // Keys that poison naive object merges.
  fc.constant(JSON.parse('{"__proto__": {"polluted": true}, "constructor": {"prototype": {"polluted": true}}}')),
);

/** Paths into a JSON value (arrays by index, objects by key), the root included. */
function pathsOf(value: unknown, prefix: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  out.push(prefix);
  if (Array.isArray(value)) value.slice(0, 8).forEach((v, i) => pathsOf(v, [...prefix, i], out));
  else if (value && typeof value === 'object') for (const [k, v] of Object.entries(value)) pathsOf(v, [...prefix, k], out);
  return out;
}

function setAt(root: unknown, path: (string | number)[], value: unknown): unknown {
  if (path.length === 0) return value;
  const copy: any = Array.isArray(root) ? [...root] : { ...(root as object) };
  const [head, ...rest] = path;
  copy[head] = setAt(copy[head], rest, value);
  return copy;
}

function deleteAt(root: unknown, path: (string | number)[]): unknown {
  if (path.length === 0) return {};
  if (path.length === 1) {
    if (Array.isArray(root)) return root.filter((_v, i) => i !== path[0]);
    const { [path[0]]: _gone, ...rest } = root as Record<string, unknown>;
    return rest;
  }
  const copy: any = Array.isArray(root) ? [...root] : { ...(root as object) };
  copy[path[0]] = deleteAt(copy[path[0]], path.slice(1));
  return copy;
}

const deepNesting = fc.integer({ min: 50, max: 3000 }).map((depth) => {
  let v: unknown = 1;
  for (let i = 0; i < depth; i++) v = i % 2 ? { n: v } : [v];
  return v;
});

const unicodeId = fc.oneof(
  fc.string({ unit: 'grapheme', minLength: 1, maxLength: 20 }),
  fc.constantFrom('ely‑1', 'gen\u00001', 'بطارية', '电池-1', '🔋', 'a'.repeat(65), '../../etc/passwd', "'; drop table runs; --", '\u202eevil', 'x\ny'),
);

/** A valid spec with one structural or value mutation somewhere: the bodies a careless client (or an attacker) sends. */
export function mutatedSpecArb(maxSteps = 12): fc.Arbitrary<unknown> {
  return validSpecArb(maxSteps).chain((spec) => {
    const paths = pathsOf(spec);
    const at = fc.constantFrom(...paths);
    return fc.oneof(
      fc.tuple(at, hostileValue).map(([p, v]) => setAt(spec, p, v)),
      at.map((p) => deleteAt(spec, p)),
      fc.tuple(at, fc.string({ maxLength: 12 }), fc.anything({ maxDepth: 1 })).map(([p, k, v]) => setAt(spec, [...p, k], v)),
      fc.tuple(at, deepNesting).map(([p, v]) => setAt(spec, p, v)),
      fc.tuple(fc.constantFrom<(string | number)[]>(['units', 0, 'id'], ['storage', 0, 'id'], ['supply', 'seriesId']), unicodeId).map(([p, v]) => setAt(spec, p, v)),
      fc.integer({ min: 35_137, max: 200_000 }).map((n) => setAt(setAt(spec, ['horizon', 'steps'], n), ['supply', 'availableKw'], new Array(n).fill(1))),
      fc.integer({ min: 51, max: 400 }).map((n) => setAt(spec, ['units'], Array.from({ length: n }, (_v, i) => ({ id: `u${i}`, kind: 'generator', ratingKw: 1 })))),
      fc.integer({ min: 1, max: 5000 }).map((n) => setAt(spec, ['supply', 'availableKw'], new Array(n).fill('NaN'))),
    );
  });
}

/** Raw request bodies that are not (valid) JSON, each with the content type it is sent under. */
export function rawBodyArb(): fc.Arbitrary<{ contentType: string; body: string }> {
  const truncated = validSpecArb(6).chain((spec) => {
    const text = JSON.stringify(spec);
    return fc.integer({ min: 0, max: Math.max(0, text.length - 1) }).map((n) => text.slice(0, n));
  });
  const contentType = fc.constantFrom(
    'application/json',
    'application/json; charset=utf-8',
    'application/merge-patch+json',
    'text/plain',
    'application/x-www-form-urlencoded',
    'text/csv',
    'application/xml',
    'application/octet-stream',
    'multipart/form-data; boundary=xyz',
    'application/json; charset=utf-16',
  );
  const body = fc.oneof(
    truncated,
    fc.string({ maxLength: 200 }),
    fc.string({ unit: 'binary', maxLength: 200 }),
    fc.constantFrom('', 'null', '[]', '"spec"', '{"horizon": NaN}', '{"horizon": Infinity}', '{"a":1,"a":2}', '\uFEFF{}', '{"__proto__":{"x":1}}', '<spec/>', 'horizon=1&steps=2', '--xyz\r\n\r\n--xyz--'),
    validSpecArb(4).map((s) => JSON.stringify(s)),
  );
  return fc.record({ contentType, body });
}
