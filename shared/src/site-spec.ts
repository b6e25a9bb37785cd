/**
 * The site spec (SPEC.md §1, extended by §5) — the one description of it: the zod schema the API, the worker,
 * the CLI and the console validate with (constant defaults included), the cross-field rules, the
 * engine's resolved input (its type inferred from a schema) and the one step that resolves the
 * defaults that depend on other fields. `openapi/openapi.yaml` carries the JSON Schema generated
 * from these (`npm run gen:openapi`). Isomorphic on purpose — no node imports.
 */
import { z } from 'zod';
import { buildPointer, parsePointer } from './json-pointer';

export const MAX_STEPS = 35_136;
export const MAX_UNITS = 50;
const MAX_STORAGE = 20;
const MAX_STORES = 20;
const MAX_CURVE_SLICES = 20;
const MAX_DEMAND_CHARGES = 20;
export const STEP_MINUTES = [5, 10, 15, 30, 60] as const;
export const MAX_TIME_LIMIT_SECONDS = 3_600;
const DEFAULT_MIP_GAP = 1e-4;
/** Validation stops listing errors after this many, so a bad 35 000-value array stays readable. */
const MAX_REPORTED_ERRORS = 100;

/**
 * Magnitudes the solver can represent next to each other: kW, kWh and money figures are 0 or
 * between these bounds. A 1e-250 kW rating or a 1e300 kW supply is finite, but no double-precision
 * solver can tell it from 0 or infinity next to ordinary figures, so the spec is refused instead.
 */
export const MIN_POWER = 1e-6;
export const MAX_POWER = 1e9;
export const MIN_PRICE = 1e-9;
export const MAX_PRICE = 1e6;

/**
 * The named parts of the spec, as `openapi/openapi.yaml` lists them under `components/schemas`
 * (request bodies: generated with `io: 'input'`, so a field with a default is optional).
 */
export const siteSpecComponents = z.registry<{ id: string }>();

const nonNegative = z
  .number()
  .min(0)
  .max(MAX_POWER)
  .refine((v) => v === 0 || v >= MIN_POWER, `must be 0 or at least ${MIN_POWER}`);
const positive = z.number().min(MIN_POWER).max(MAX_POWER);
const money = z
  .number()
  .min(-MAX_PRICE)
  .max(MAX_PRICE)
  .refine((v) => v === 0 || Math.abs(v) >= MIN_PRICE, `must be 0 or at least ${MIN_PRICE} in size`);
const nonNegativeMoney = z
  .number()
  .min(0, 'must be at least 0')
  .max(MAX_PRICE)
  .refine((v) => v === 0 || v >= MIN_PRICE, `must be 0 or at least ${MIN_PRICE} in size`);
const kwSeries = z
  .array(nonNegative)
  .min(1)
  .max(MAX_STEPS)
  .meta({ description: 'One value per step (length = `horizon.steps`), each ≥ 0.' })
  .register(siteSpecComponents, { id: 'KwSeries' });
const priceSeries = z
  .union([money, z.array(money).min(1).max(MAX_STEPS)])
  .meta({ description: 'One price for every step, or one per step.' })
  .register(siteSpecComponents, { id: 'PriceSeries' });
const assetId = z
  .string()
  .min(1)
  .max(64)
  .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, 'must start with a letter or digit and use only letters, digits, ".", "_" and "-"')
  .register(siteSpecComponents, { id: 'AssetId' });
const steps = z.number().int().min(1).max(MAX_STEPS);

/** An IANA time-zone name the runtime's time-zone database knows (Intl throws a RangeError otherwise). */
export function isKnownTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

const horizonSchema = z.strictObject({
  start: z.iso
    .datetime({ offset: true, error: 'must be an ISO 8601 date-time with a UTC offset, e.g. 2027-03-01T00:00:00+01:00' })
    .meta({ description: 'ISO 8601 with a UTC offset.' }),
  stepMinutes: z.literal(STEP_MINUTES, { error: `must be one of ${STEP_MINUTES.join(', ')}` }),
  steps: steps.meta({ description: 'Up to 366 days at 15 min; a plan may cap it lower.' }),
  timeZone: z
    .string()
    .min(1)
    .max(64)
    .refine(isKnownTimeZone, 'must be an IANA time-zone name such as "Europe/Vienna" or "Etc/GMT-1"')
    .optional()
    .meta({
      description:
        "IANA time zone: local time for demand-charge windows, the schedule's timestamps and exports, with daylight saving. " +
        "Absent: the start's fixed UTC offset.",
    }),
});

const supplySchema = z
  .union(
    [
      z.strictObject({ availableKw: kwSeries }),
      z.strictObject({ seriesId: z.string().min(1).max(100).meta({ example: 'ser_6f1c2a9e0b7d4c3e8a5f1b2c3d4e5f60' }) }),
    ],
    { error: 'must be { "availableKw": [kW per step] } or { "seriesId": "<an uploaded series>" }' },
  )
  .meta({ description: 'Available supply per step: inline, or an uploaded series (`POST /v1/series`).' });

const siteLoadSchema = z.strictObject({
  kw: kwSeries,
  unservedPenaltyPerKwh: nonNegativeMoney.optional().meta({ description: 'Absent: the load is hard.' }),
});

const clockTime = (allowEndOfDay: boolean) =>
  z
    .string()
    .regex(
      allowEndOfDay ? /^(([01]\d|2[0-3]):[0-5]\d|24:00)$/ : /^([01]\d|2[0-3]):[0-5]\d$/,
      allowEndOfDay ? 'must be a local time "HH:MM" from "00:00" to "24:00"' : 'must be a local time "HH:MM" from "00:00" to "23:59"',
    );

const demandChargeSchema = z
  .strictObject({
    id: assetId,
    pricePerKw: nonNegativeMoney.meta({ description: 'Money per kW of the highest import in the window, over this horizon.' }),
    window: z
      .strictObject({
        daysOfWeek: z
          .array(z.number().int().min(1).max(7))
          .min(1)
          .max(7)
          .default([1, 2, 3, 4, 5, 6, 7])
          .meta({ description: "ISO weekdays (1 = Monday … 7 = Sunday) of the step's own local date; default every day." }),
        from: clockTime(false).default('00:00').meta({ description: 'Local time, inclusive.' }),
        to: clockTime(true)
          .default('24:00')
          .meta({ description: 'Local time, exclusive. "00:00"–"24:00" is the whole day; `from` after `to` wraps past midnight; equal is empty.' }),
      })
      .prefault({})
      .meta({ description: "Which steps set the peak, by the local time of each step's start. Absent: every step." }),
    existingPeakKw: nonNegative
      .default(0)
      .meta({ description: 'The peak already set this billing period: the charge pays only for import above it.' }),
  })
  .register(siteSpecComponents, { id: 'DemandCharge' });

const gridSchema = z
  .strictObject({
    importLimitKw: nonNegative.default(0),
    exportLimitKw: nonNegative.default(0),
    importPrice: priceSeries.default(0),
    exportPrice: priceSeries.default(0),
    demandCharges: z
      .array(demandChargeSchema)
      .max(MAX_DEMAND_CHARGES)
      .default([])
      .meta({ description: 'Each a price on the highest import in its local-time window (SPEC §5). A window that matches no step is a warning.' }),
  })
  .meta({ description: 'Absent: an island (no import, no export).' });

const storeLink = z
  .strictObject({
    store: assetId.meta({ description: 'The id of an entry of `stores`.' }),
    perKwh: positive.meta({ description: "Units of the store's product per kWh of the unit's power." }),
  })
  .register(siteSpecComponents, { id: 'StoreLink' });

const unitSchema = z
  .strictObject({
    id: assetId,
    kind: z.enum(['flexible-load', 'generator']),
    ratingKw: positive,
    minStableKw: nonNegative.default(0).meta({ description: 'Default 0; at most ratingKw.' }),
    valuePerKwh: money.optional().meta({ description: 'Flexible loads; default 0. `valueCurve` replaces it.' }),
    costPerKwh: money.optional().meta({ description: 'Generators; default 0. `costCurve` replaces it.' }),
    noLoadCostPerHour: nonNegativeMoney
      .default(0)
      .meta({ description: 'Paid every hour the unit is on, at any output (idling fuel, auxiliaries).' }),
    costCurve: z
      .array(z.strictObject({ upToKw: positive, costPerKwh: money }))
      .min(1)
      .max(MAX_CURVE_SLICES)
      .optional()
      .meta({
        description:
          'Generators: the incremental cost of each slice of output from 0 kW (the previous slice\'s upToKw) to its upToKw. ' +
          'Costs must not fall from one slice to the next (a convex curve) and the last upToKw is the rating.',
      }),
    valueCurve: z
      .array(z.strictObject({ upToKw: positive, valuePerKwh: money }))
      .min(1)
      .max(MAX_CURVE_SLICES)
      .optional()
      .meta({
        description:
          'Flexible loads: the incremental value of each slice of consumption from 0 kW. Values must not rise from one slice ' +
          'to the next (a concave curve) and the last upToKw is the rating.',
      }),
    startupCost: z
      .union([
        nonNegativeMoney,
        z.strictObject({
          hot: nonNegativeMoney,
          cold: nonNegativeMoney,
          coldAfterSteps: z
            .number()
            .int()
            .min(0)
            .max(MAX_STEPS)
            .meta({ description: 'A start after at most this many steps off is hot; one more step off makes it cold.' }),
        }),
      ])
      .default(0)
      .meta({ description: 'A number, or hot and cold start costs (`cold ≥ hot`). A unit off since forever starts cold.' }),
    minUpSteps: steps.default(1),
    minDownSteps: steps.default(1),
    rampUpKwPerMin: nonNegative
      .optional()
      .meta({ description: 'Output may rise by at most this × stepMinutes per step; a start may reach max(minStableKw, that) in its first step.' }),
    rampDownKwPerMin: nonNegative
      .optional()
      .meta({ description: 'Output may fall by at most this × stepMinutes per step; a stop may leave from at most max(minStableKw, that).' }),
    initial: z
      .strictObject({
        on: z.boolean(),
        stepsInState: z
          .number()
          .int()
          .min(0)
          .optional()
          .meta({ description: 'Steps the unit has already been in that state before step 0, in the other state before that; absent: forever.' }),
        powerKw: nonNegative
          .optional()
          .meta({ description: 'Output at step −1 of a unit that is on; the ramp limits apply from it. Absent: no ramp limit at step 0.' }),
      })
      .prefault({ on: false })
      .meta({ description: 'Default: off forever.' }),
    providesReserve: z
      .boolean()
      .optional()
      .meta({ description: 'Counts towards `reserve`: a generator by its headroom, a flexible load by backing off. Default: true for generators.' }),
    produces: storeLink.optional().meta({ description: "Puts `perKwh` units of a store's product into it per kWh of its power." }),
    consumes: storeLink.optional().meta({ description: "Takes `perKwh` units of a store's product from it per kWh of its power." }),
  })
  .register(siteSpecComponents, { id: 'UnitSpec' });

/** SPEC.md §1 allows (0, 1]; below 0.1 % the SOC equation's coefficients leave the solver's range. */
const efficiency = z.number().min(1e-3, 'must be in (0, 1] and at least 0.001').max(1);

const storageSchema = z
  .strictObject({
    id: assetId,
    capacityKwh: positive,
    maxChargeKw: nonNegative,
    maxDischargeKw: nonNegative,
    chargeEfficiency: efficiency.default(1),
    dischargeEfficiency: efficiency.default(1),
    minSocKwh: nonNegative.default(0),
    initialSocKwh: nonNegative,
    finalSocKwh: nonNegative.optional().meta({ description: 'Absent: no target.' }),
    cycleCostPerKwh: nonNegativeMoney.default(0),
    chargeFromSupplyOnly: z
      .boolean()
      .default(false)
      .meta({ description: 'Never charged from the grid: import serves only the site load, flexible loads and other batteries.' }),
    providesReserve: z.boolean().default(true).meta({ description: 'Counts towards `reserve` by its unused discharge and the charging it can stop.' }),
  })
  .register(siteSpecComponents, { id: 'StorageSpec' });

const storeSchema = z
  .strictObject({
    id: assetId,
    product: z.string().min(1).max(64).optional().meta({ description: 'A label for people and exports, e.g. "hydrogen".' }),
    unit: z.string().min(1).max(32).optional().meta({ description: 'The unit of the level and flows, e.g. "kg" or "m3".' }),
    capacity: positive,
    min: nonNegative.default(0),
    initial: nonNegative,
    final: nonNegative.optional().meta({ description: 'Level the store must at least end with; absent: no target.' }),
    demandPerHour: z
      .union([nonNegative, z.array(nonNegative).min(1).max(MAX_STEPS)])
      .default(0)
      .meta({ description: 'Drawn every hour, in the unit per hour: one figure, or one per step.' }),
    inflowPerHour: z
      .union([nonNegative, z.array(nonNegative).min(1).max(MAX_STEPS)])
      .default(0)
      .meta({
        description:
          'Extension: product arriving from outside every hour, in the unit per hour (a fuel delivery, a river\'s inflow): one ' +
          'figure, or one per step. Default 0.',
      }),
    lossPerHour: z.number().min(0).max(1).default(0).meta({ description: 'Fraction of the level lost per hour.' }),
    shortfallPenaltyPerUnit: nonNegativeMoney.optional().meta({ description: 'Money per unit of demand not met; absent: the demand is hard.' }),
    spillAllowed: z.boolean().default(false).meta({ description: 'Excess product may be discarded at no value.' }),
  })
  .meta({ description: 'A store of a product other than electricity (fuel, water, hydrogen, heat) that units produce into or consume from.' })
  .register(siteSpecComponents, { id: 'StoreSpec' });

const reserveSchema = z
  .strictObject({
    upKw: z
      .union([nonNegative, z.array(nonNegative).min(1).max(MAX_STEPS)])
      .meta({ description: 'Spinning reserve to hold: one figure, or one per step.' }),
    shortfallPenaltyPerKwh: nonNegativeMoney.optional().meta({ description: 'Money per kWh of reserve short; absent: the reserve is hard.' }),
  })
  .register(siteSpecComponents, { id: 'Reserve' });

export const reductionsSchema = z
  .strictObject({
    sparseSets: z.boolean().default(true).meta({ description: 'On/off binaries only at steps where a unit can run at all.' }),
    tightBigM: z.boolean().default(true).meta({ description: 'Every big-M the smallest valid bound (a rating, a per-step reachable power).' }),
    scaling: z.boolean().default(true).meta({ description: 'Internal power and money units (powers of ten) that keep coefficients near 1.' }),
    relaxExclusivity: z
      .boolean()
      .default(true)
      .meta({ description: 'No charge/discharge or import/export binary where doing both at once can never pay.' }),
    independentBlocks: z
      .boolean()
      .default(true)
      .meta({
        description:
          'Solve the parts of a model that no constraint links separately and in parallel: with no storage, steps where sparse ' +
          'sets leave every unit off for at least its minimum down time separate the horizon into independent blocks. Their ' +
          'optima add up to the optimum.',
      }),
  })
  .meta({ description: 'Each formulation technique can be switched off; none changes the optimum. All default to true.' })
  .register(siteSpecComponents, { id: 'Reductions' });

const windowSchema = z
  .strictObject({
    windowSteps: steps.optional(),
    commitSteps: steps.optional(),
    segmentWindows: z
      .number()
      .int()
      .min(0)
      .max(MAX_STEPS)
      .refine((v) => v === 0 || v >= 2, 'must be 0 (one sequence) or at least 2')
      .default(32)
      .meta({
        description:
          'A horizon of at least twice this many windows is cut into segments of about this many, solved side by side. The ' +
          'state where a segment starts is chosen beforehand by a probe window solved from one commit earlier; the segment ' +
          'before must end in it. When a segment cannot (or a probe finds no schedule) the horizon is solved on from before ' +
          'that seam as one sequence. The cut depends on the spec alone, so the schedule is the same on any machine. 0 keeps ' +
          'one sequence, as does a horizon of fewer than twice this many windows; 1 is refused. Default 32 (a month of daily windows).',
      }),
    lookahead: z
      .enum(['relaxed', 'integer'])
      .default('relaxed')
      .meta({
        description:
          '`relaxed` (default): the steps a window solves beyond those it keeps have their on/off and exclusivity decisions ' +
          'relaxed to [0, 1] (relax-and-fix): they only value the state the kept steps leave. The kept steps are always ' +
          'integral. `integer` solves the whole window as a MIP (slower; on the benchmark sites it changed the objective by under 0.01 %).',
      }),
  })
  .meta({
    description:
      'Rolling horizon: solve `windowSteps`, keep `commitSteps`, carry SOC, on/off state and time in state into the next ' +
      'window. Default: the steps in 36 h and 24 h. Non-final windows credit energy left in storage at what it would fetch ' +
      "later (the median import price over the lookahead, or the island's value of energy), times the discharge efficiency.",
  });

const solverSchema = z
  .strictObject({
    mode: z
      .enum(['auto', 'monolithic', 'rolling'])
      .default('auto')
      .meta({
        description:
          '`auto` solves short horizons whole and rolls on long ones, unless the model falls apart into small independent ' +
          'blocks (a site without storage whose units cannot run at night): then it is solved whole, and exactly, however long the horizon.',
      }),
    window: windowSchema.prefault({}),
    timeLimitSeconds: z
      .number()
      .positive()
      .max(MAX_TIME_LIMIT_SECONDS)
      .optional()
      .meta({
        description:
          'Wall-clock limit for the whole run (all rolling windows together). Default: 60 s, or steps ÷ 60 seconds on longer ' +
          'horizons (a 15-minute year gets 584 s).',
      }),
    mipGap: z.number().min(0).max(1).default(DEFAULT_MIP_GAP).meta({ description: 'Relative MIP gap; default 0.0001.' }),
    reductions: reductionsSchema.prefault({}),
  });

const baseSchema = z.strictObject({
  name: z.string().max(200).optional(),
  horizon: horizonSchema,
  supply: supplySchema,
  siteLoad: siteLoadSchema.optional(),
  grid: gridSchema.optional(),
  units: z.array(unitSchema).max(MAX_UNITS).default([]),
  storage: z.array(storageSchema).max(MAX_STORAGE).default([]),
  stores: z.array(storeSchema).max(MAX_STORES).default([]),
  reserve: reserveSchema.optional().meta({ description: 'Spinning reserve the online fleet must hold (SPEC §5); absent: none.' }),
  solver: solverSchema.prefault({}),
});

export interface SpecIssue {
  pointer: string;
  message: string;
}

type BaseSpec = z.output<typeof baseSchema>;

/** The rules that relate one field to another (SPEC.md §1 and §5 limits that zod shapes cannot express). */
function crossFieldIssues(spec: BaseSpec): SpecIssue[] {
  const issues: SpecIssue[] = [];
  const T = spec.horizon.steps;
  const lengthIs = (pointer: string, values: unknown) => {
    if (Array.isArray(values) && values.length !== T) {
      issues.push({ pointer, message: `has ${values.length} values; horizon.steps is ${T}` });
    }
  };
  if ('availableKw' in spec.supply) lengthIs('/supply/availableKw', spec.supply.availableKw);
  if (spec.siteLoad) lengthIs('/siteLoad/kw', spec.siteLoad.kw);
  if (spec.grid) {
    lengthIs('/grid/importPrice', spec.grid.importPrice);
    lengthIs('/grid/exportPrice', spec.grid.exportPrice);
  }
  if (spec.reserve) lengthIs('/reserve/upKw', spec.reserve.upKw);

  const seen = new Map<string, string>();
  const claimId = (value: string, pointer: string) => {
    const first = seen.get(value);
    if (first) issues.push({ pointer, message: `id "${value}" is already used at ${first}; ids must be unique across units, storage and stores` });
    else seen.set(value, pointer);
  };
  const storeIds = new Set(spec.stores.map((s) => s.id));
  spec.units.forEach((u, i) => {
    const at = `/units/${i}`;
    claimId(u.id, `${at}/id`);
    if (u.minStableKw > u.ratingKw) issues.push({ pointer: `${at}/minStableKw`, message: `${u.minStableKw} exceeds ratingKw ${u.ratingKw}` });
    issues.push(...curveIssues(u, at));
    if (typeof u.startupCost === 'object' && u.startupCost.cold < u.startupCost.hot) {
      issues.push({ pointer: `${at}/startupCost/cold`, message: `${u.startupCost.cold} is below hot ${u.startupCost.hot}; a cold start costs at least a hot one` });
    }
    const p0 = u.initial.powerKw;
    if (p0 !== undefined) {
      if (!u.initial.on && p0 > 0) {
        issues.push({ pointer: `${at}/initial/powerKw`, message: `${p0} kW, but the unit is off at the start (initial.on false); an off unit runs at 0 kW` });
      } else if (u.initial.on && (p0 > u.ratingKw || p0 < u.minStableKw)) {
        issues.push({ pointer: `${at}/initial/powerKw`, message: `${p0} kW must lie within [minStableKw ${u.minStableKw}, ratingKw ${u.ratingKw}] for a unit that is on` });
      }
    }
    for (const link of ['produces', 'consumes'] as const) {
      const target = u[link]?.store;
      if (target !== undefined && !storeIds.has(target)) issues.push({ pointer: `${at}/${link}/store`, message: `no store "${target}" in stores` });
    }
  });
  spec.storage.forEach((s, i) => {
    claimId(s.id, `/storage/${i}/id`);
    const minSoc = s.minSocKwh;
    if (minSoc > s.capacityKwh) {
      issues.push({ pointer: `/storage/${i}/minSocKwh`, message: `${minSoc} exceeds capacityKwh ${s.capacityKwh}` });
    }
    if (s.initialSocKwh < minSoc || s.initialSocKwh > s.capacityKwh) {
      issues.push({ pointer: `/storage/${i}/initialSocKwh`, message: `${s.initialSocKwh} must lie within [minSocKwh ${minSoc}, capacityKwh ${s.capacityKwh}]` });
    }
    if (s.finalSocKwh !== undefined && (s.finalSocKwh < minSoc || s.finalSocKwh > s.capacityKwh)) {
      issues.push({ pointer: `/storage/${i}/finalSocKwh`, message: `${s.finalSocKwh} must lie within [minSocKwh ${minSoc}, capacityKwh ${s.capacityKwh}]` });
    }
  });
  spec.stores.forEach((s, i) => {
    const at = `/stores/${i}`;
    claimId(s.id, `${at}/id`);
    if (s.min > s.capacity) issues.push({ pointer: `${at}/min`, message: `${s.min} exceeds capacity ${s.capacity}` });
    if (s.initial < s.min || s.initial > s.capacity) {
      issues.push({ pointer: `${at}/initial`, message: `${s.initial} must lie within [min ${s.min}, capacity ${s.capacity}]` });
    }
    if (s.final !== undefined && (s.final < s.min || s.final > s.capacity)) {
      issues.push({ pointer: `${at}/final`, message: `${s.final} must lie within [min ${s.min}, capacity ${s.capacity}]` });
    }
    lengthIs(`${at}/demandPerHour`, s.demandPerHour);
    lengthIs(`${at}/inflowPerHour`, s.inflowPerHour);
  });
  const chargeIds = new Map<string, number>();
  spec.grid?.demandCharges.forEach((c, i) => {
    const first = chargeIds.get(c.id);
    if (first !== undefined) issues.push({ pointer: `/grid/demandCharges/${i}/id`, message: `id "${c.id}" is already used at /grid/demandCharges/${first}/id` });
    else chargeIds.set(c.id, i);
    if (new Set(c.window.daysOfWeek).size !== c.window.daysOfWeek.length) {
      issues.push({ pointer: `/grid/demandCharges/${i}/window/daysOfWeek`, message: 'lists a weekday twice' });
    }
  });

  const w = spec.solver.window;
  if (w.windowSteps !== undefined && w.commitSteps !== undefined && w.commitSteps > w.windowSteps) {
    issues.push({ pointer: '/solver/window/commitSteps', message: `${w.commitSteps} exceeds windowSteps ${w.windowSteps}` });
  }
  return issues;
}

/**
 * A cost curve must be convex (incremental costs non-decreasing) and a value curve concave (values
 * non-increasing), so the slices fill in order without binaries; slices rise strictly and the last
 * one ends at the rating. A curve replaces the single per-kWh figure of its kind.
 */
function curveIssues(u: BaseSpec['units'][number], at: string): SpecIssue[] {
  const issues: SpecIssue[] = [];
  const check = (field: 'costCurve' | 'valueCurve', slices: { upToKw: number; price: number }[]) => {
    const kind = field === 'costCurve' ? 'generator' : 'flexible-load';
    const single = field === 'costCurve' ? 'costPerKwh' : 'valuePerKwh';
    if (u.kind !== kind) {
      issues.push({ pointer: `${at}/${field}`, message: `is for ${kind}s; a ${u.kind} uses ${u.kind === 'generator' ? 'costCurve' : 'valueCurve'}` });
      return;
    }
    if (u[single] !== undefined) issues.push({ pointer: `${at}/${single}`, message: `give ${single} or ${field}, not both: the curve replaces it` });
    const priceField = field === 'costCurve' ? 'costPerKwh' : 'valuePerKwh';
    slices.forEach((slice, k) => {
      if (k === 0) return;
      const before = slices[k - 1];
      if (slice.upToKw <= before.upToKw) {
        issues.push({ pointer: `${at}/${field}/${k}/upToKw`, message: `${slice.upToKw} must be above the previous slice's upToKw ${before.upToKw}` });
      }
      if (field === 'costCurve' ? slice.price < before.price : slice.price > before.price) {
        const rule = field === 'costCurve' ? 'costs must not fall from one slice to the next (a convex curve)' : 'values must not rise from one slice to the next (a concave curve)';
        issues.push({ pointer: `${at}/${field}/${k}/${priceField}`, message: `${slice.price} after ${before.price}: ${rule}` });
      }
    });
    const last = slices.length - 1;
    if (slices[last].upToKw !== u.ratingKw) {
      issues.push({ pointer: `${at}/${field}/${last}/upToKw`, message: `${slices[last].upToKw} must equal ratingKw ${u.ratingKw}: the last slice ends at the rating` });
    }
  };
  if (u.costCurve) check('costCurve', u.costCurve.map((s) => ({ upToKw: s.upToKw, price: s.costPerKwh })));
  if (u.valueCurve) check('valueCurve', u.valueCurve.map((s) => ({ upToKw: s.upToKw, price: s.valuePerKwh })));
  return issues;
}

function pointerToPath(pointer: string): (string | number)[] {
  return parsePointer(pointer).map((s) => (/^\d+$/.test(s) ? Number(s) : s));
}

/** The spec as a request body: every SPEC.md §1 rule, the constant defaults filled in on parsing. */
export const siteSpecSchema = baseSchema
  .superRefine((spec, ctx) => {
    for (const issue of crossFieldIssues(spec)) {
      ctx.addIssue({ code: 'custom', message: issue.message, path: pointerToPath(issue.pointer) });
    }
  })
  .meta({
    description:
      "The site spec (SPEC.md §1, extended by §5). Powers kW, energies kWh, money in the tenant's currency. Beyond this schema " +
      'the API checks (400 with pointers): array lengths equal `horizon.steps`, `minStableKw ≤ ratingKw`, `minSocKwh ≤ ' +
      'initialSocKwh ≤ capacityKwh` (also `finalSocKwh`, and a store\'s `min ≤ initial ≤ capacity`), ids unique across units, ' +
      'storage and stores, a convex `costCurve` / concave `valueCurve` whose last `upToKw` is the rating (not beside the single ' +
      'figure it replaces), `cold ≥ hot` start costs, `initial.powerKw` within the output range of a unit that is on, ' +
      '`produces`/`consumes` naming an existing store, `commitSteps ≤ windowSteps`, `segmentWindows` 0 or at least 2, a ' +
      "`seriesId` of your tenant with the horizon's step covering the horizon; the plan's caps on steps and units (422). " +
      'Extension points: `supply` is inline values or an uploaded series; prices are a number or one per step; ' +
      '`solver.reductions` switches each formulation technique; `solver.mode` and `solver.window` choose the rolling horizon. ' +
      'Unknown fields are refused.',
  })
  .register(siteSpecComponents, { id: 'SiteSpec' });

/** The spec as a client writes it (what `GET /v1/runs/{id}/spec` returns); supply may name an uploaded series. */
export type SiteSpec = z.input<typeof siteSpecSchema>;
/** A spec that passed validation, its constant defaults filled in. */
export type ValidSiteSpec = z.output<typeof siteSpecSchema>;

const sliceSchema = z.strictObject({
  upToKw: positive,
  /** The slice's incremental cost (generators) or value (flexible loads) per kWh. */
  perKwh: money,
});

const resolvedStoreLink = z.strictObject({
  /** Index into `stores`. */
  store: z.number().int().min(0),
  perKwh: positive,
});

const resolvedUnitSchema = unitSchema
  .omit({ valuePerKwh: true, costPerKwh: true, costCurve: true, valueCurve: true, produces: true, consumes: true })
  .extend({
    /**
     * The unit's energy price as slices of output from 0 kW (SPEC §5): costs for generators
     * (non-decreasing), values for flexible loads (non-increasing), the last one ending at the
     * rating. A single `costPerKwh` / `valuePerKwh` (default 0) is one slice.
     */
    curve: z.array(sliceSchema).min(1),
    /** A single number is `hot = cold` with `coldAfterSteps` null: every start costs the same. */
    startupCost: z.strictObject({ hot: nonNegativeMoney, cold: nonNegativeMoney, coldAfterSteps: z.number().int().min(0).nullable() }),
    /** null: no ramp limit that way. */
    rampUpKwPerMin: nonNegative.nullable(),
    rampDownKwPerMin: nonNegative.nullable(),
    /**
     * "Forever" is resolved to the longest history any rule looks back over (stateMemorySteps);
     * `powerKw` null: no ramp limit at step 0 (or the unit is off).
     */
    initial: z.strictObject({ on: z.boolean(), stepsInState: z.number().int().min(0), powerKw: nonNegative.nullable() }),
    providesReserve: z.boolean(),
    produces: resolvedStoreLink.nullable(),
    consumes: resolvedStoreLink.nullable(),
  });

const resolvedStorageSchema = storageSchema.extend({
  /** null: no final target. */
  finalSocKwh: nonNegative.nullable(),
});

const resolvedStoreSchema = storeSchema.extend({
  product: z.string().nullable(),
  unit: z.string().nullable(),
  /** null: no final target. */
  final: nonNegative.nullable(),
  demandPerHour: z.array(nonNegative),
  inflowPerHour: z.array(nonNegative),
  /** null: the demand is hard. */
  shortfallPenaltyPerUnit: nonNegativeMoney.nullable(),
});

/** The engine's input: supply resolved to numbers, every default applied, every price and demand an array of `steps`. */
export const resolvedSiteSpecSchema = z.strictObject({
  name: z.string().nullable(),
  /** `timeZone` null: local time is the start's fixed UTC offset. */
  horizon: horizonSchema.extend({ stepMinutes: z.number().int(), timeZone: z.string().nullable() }),
  supply: z.strictObject({ availableKw: kwSeries }),
  /** Always present; no site load ⇒ zeros. `unservedPenaltyPerKwh` null ⇒ the load is hard. */
  siteLoad: siteLoadSchema.extend({ unservedPenaltyPerKwh: nonNegativeMoney.nullable() }),
  /** Always present; `island` true when the spec had no grid (then limits are 0). */
  grid: gridSchema.extend({ island: z.boolean(), importPrice: z.array(money), exportPrice: z.array(money) }),
  units: z.array(resolvedUnitSchema),
  storage: z.array(resolvedStorageSchema),
  stores: z.array(resolvedStoreSchema),
  /** null: no spinning reserve requirement. `shortfallPenaltyPerKwh` null ⇒ the reserve is hard. */
  reserve: z.strictObject({ upKw: z.array(nonNegative), shortfallPenaltyPerKwh: nonNegativeMoney.nullable() }).nullable(),
  solver: solverSchema.extend({
    /**
     * `segmentWindows` 0: one sequence of windows, never split into parallel segments.
     * `lookahead` "relaxed": binaries after a window's committed steps are relaxed to [0, 1].
     */
    window: windowSchema.extend({ windowSteps: steps, commitSteps: steps }),
    timeLimitSeconds: z.number().positive().max(MAX_TIME_LIMIT_SECONDS),
    reductions: reductionsSchema,
  }),
});

export type ResolvedSiteSpec = z.output<typeof resolvedSiteSpecSchema>;
export type ResolvedUnit = ResolvedSiteSpec['units'][number];
export type ResolvedStorage = ResolvedSiteSpec['storage'][number];
export type ResolvedStore = ResolvedSiteSpec['stores'][number];
export type ResolvedDemandCharge = ResolvedSiteSpec['grid']['demandCharges'][number];

/**
 * How many steps of a unit's past any rule looks back over: its minimum up and down times, and
 * for two-level start costs the off time that makes a start cold (one more than `coldAfterSteps`).
 * A state held this long is as good as held forever.
 */
export function stateMemorySteps(u: Pick<ResolvedUnit, 'minUpSteps' | 'minDownSteps' | 'startupCost'>): number {
  const { hot, cold, coldAfterSteps } = u.startupCost;
  const startHistory = coldAfterSteps !== null && cold !== hot ? coldAfterSteps + 1 : 0;
  return Math.max(u.minUpSteps, u.minDownSteps, startHistory);
}

export type SpecValidation = { ok: true; spec: ValidSiteSpec } | { ok: false; errors: SpecIssue[] };

/** zod names the object that has unknown keys; a client wants a pointer to each key. */
function issuesOf(error: z.ZodError): SpecIssue[] {
  return error.issues.flatMap((issue) =>
    issue.code === 'unrecognized_keys'
      ? issue.keys.map((key) => ({ pointer: buildPointer([...issue.path, key]), message: 'is not a field of the site spec' }))
      : [{ pointer: buildPointer(issue.path), message: issue.message }],
  );
}

/** Validates against SPEC.md §1; every error carries an RFC 6901 pointer. */
export function validateSiteSpec(input: unknown): SpecValidation {
  const parsed = siteSpecSchema.safeParse(input);
  if (parsed.success) return { ok: true, spec: parsed.data };
  return { ok: false, errors: issuesOf(parsed.error).slice(0, MAX_REPORTED_ERRORS) };
}

/** Steps in `hours` hours at this step length (at least one). */
function stepsInHours(hours: number, stepMinutes: number): number {
  return Math.max(1, Math.round((hours * 60) / stepMinutes));
}

/**
 * The time limit when a spec names none: 60 s, growing with the horizon so a rolling year
 * (35 040 steps ⇒ 584 s) has about 1.6 s per daily window even on a busy machine.
 */
function defaultTimeLimitSeconds(steps: number): number {
  return Math.min(MAX_TIME_LIMIT_SECONDS, Math.max(60, Math.ceil(steps / 60)));
}

function perStepArray(value: number | number[], T: number): number[] {
  return Array.isArray(value) ? value.slice() : new Array<number>(T).fill(value);
}

function resolveUnit(u: ValidSiteSpec['units'][number], storeIndex: Map<string, number>): ResolvedUnit {
  const { valuePerKwh, costPerKwh, costCurve, valueCurve, produces, consumes, ...rest } = u;
  const curve =
    u.kind === 'generator'
      ? (costCurve?.map((slice) => ({ upToKw: slice.upToKw, perKwh: slice.costPerKwh })) ?? [{ upToKw: u.ratingKw, perKwh: costPerKwh ?? 0 }])
      : (valueCurve?.map((slice) => ({ upToKw: slice.upToKw, perKwh: slice.valuePerKwh })) ?? [{ upToKw: u.ratingKw, perKwh: valuePerKwh ?? 0 }]);
  const startupCost =
    typeof u.startupCost === 'number' ? { hot: u.startupCost, cold: u.startupCost, coldAfterSteps: null } : u.startupCost;
  const link = (l: typeof produces) => (l ? { store: storeIndex.get(l.store)!, perKwh: l.perKwh } : null);
  return {
    ...rest,
    curve,
    startupCost,
    rampUpKwPerMin: u.rampUpKwPerMin ?? null,
    rampDownKwPerMin: u.rampDownKwPerMin ?? null,
    initial: {
      on: u.initial.on,
      stepsInState: u.initial.stepsInState ?? stateMemorySteps({ minUpSteps: u.minUpSteps, minDownSteps: u.minDownSteps, startupCost }),
      powerKw: u.initial.on ? (u.initial.powerKw ?? null) : null,
    },
    providesReserve: u.providesReserve ?? u.kind === 'generator',
    produces: link(produces),
    consumes: link(consumes),
  };
}

/**
 * Resolves the defaults that depend on other fields (SPEC.md §1 and §5): supply from the series
 * values the caller looked up (a spec with inline supply ignores `availableKw`), scalar prices,
 * demands and reserve to one per step, no grid to an island, no site load to zeros, a unit's
 * curve, start costs, history and store links, the rolling windows from the step length and the
 * time limit from the horizon.
 */
export function resolveDefaults(spec: ValidSiteSpec, availableKw?: number[]): ResolvedSiteSpec {
  const T = spec.horizon.steps;
  let supply: number[];
  if ('availableKw' in spec.supply) supply = spec.supply.availableKw.slice();
  else if (availableKw) supply = availableKw.slice();
  else throw new Error(`supply.seriesId "${spec.supply.seriesId}" needs its values to resolve the spec`);
  if (supply.length !== T) throw new Error(`supply has ${supply.length} values; horizon.steps is ${T}`);

  const { solver } = spec;
  const windowSteps = solver.window.windowSteps ?? stepsInHours(36, spec.horizon.stepMinutes);
  const grid = spec.grid ?? gridSchema.parse({});
  const storeIndex = new Map(spec.stores.map((s, j) => [s.id, j]));
  return {
    name: spec.name ?? null,
    horizon: { ...spec.horizon, timeZone: spec.horizon.timeZone ?? null },
    supply: { availableKw: supply },
    siteLoad: {
      kw: spec.siteLoad ? spec.siteLoad.kw.slice() : new Array<number>(T).fill(0),
      unservedPenaltyPerKwh: spec.siteLoad?.unservedPenaltyPerKwh ?? null,
    },
    grid: { ...grid, island: !spec.grid, importPrice: perStepArray(grid.importPrice, T), exportPrice: perStepArray(grid.exportPrice, T) },
    units: spec.units.map((u) => resolveUnit(u, storeIndex)),
    storage: spec.storage.map((s) => ({ ...s, finalSocKwh: s.finalSocKwh ?? null })),
    stores: spec.stores.map((s) => ({
      ...s,
      product: s.product ?? null,
      unit: s.unit ?? null,
      final: s.final ?? null,
      demandPerHour: perStepArray(s.demandPerHour, T),
      inflowPerHour: perStepArray(s.inflowPerHour, T),
      shortfallPenaltyPerUnit: s.shortfallPenaltyPerUnit ?? null,
    })),
    reserve: spec.reserve ? { upKw: perStepArray(spec.reserve.upKw, T), shortfallPenaltyPerKwh: spec.reserve.shortfallPenaltyPerKwh ?? null } : null,
    solver: {
      ...solver,
      window: {
        ...solver.window,
        windowSteps,
        commitSteps: solver.window.commitSteps ?? Math.min(windowSteps, stepsInHours(24, spec.horizon.stepMinutes)),
      },
      timeLimitSeconds: solver.timeLimitSeconds ?? defaultTimeLimitSeconds(T),
    },
  };
}
