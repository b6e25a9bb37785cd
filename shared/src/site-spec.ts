/**
 * The site spec v1 (SPEC.md §1) — the one description of it: the zod schema the API, the worker,
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
const MIN_PRICE = 1e-9;
const MAX_PRICE = 1e6;

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

const horizonSchema = z.strictObject({
  start: z.iso
    .datetime({ offset: true, error: 'must be an ISO 8601 date-time with a UTC offset, e.g. 2027-03-01T00:00:00+01:00' })
    .meta({ description: 'ISO 8601 with a UTC offset.' }),
  stepMinutes: z.literal(STEP_MINUTES, { error: `must be one of ${STEP_MINUTES.join(', ')}` }),
  steps: steps.meta({ description: 'Up to 366 days at 15 min; a plan may cap it lower.' }),
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

const gridSchema = z
  .strictObject({
    importLimitKw: nonNegative.default(0),
    exportLimitKw: nonNegative.default(0),
    importPrice: priceSeries.default(0),
    exportPrice: priceSeries.default(0),
  })
  .meta({ description: 'Absent: an island (no import, no export).' });

const unitSchema = z
  .strictObject({
    id: assetId,
    kind: z.enum(['flexible-load', 'generator']),
    ratingKw: positive,
    minStableKw: nonNegative.default(0).meta({ description: 'Default 0; at most ratingKw.' }),
    valuePerKwh: money.default(0).meta({ description: 'Flexible loads; default 0.' }),
    costPerKwh: money.default(0).meta({ description: 'Generators; default 0.' }),
    startupCost: nonNegativeMoney.default(0),
    minUpSteps: steps.default(1),
    minDownSteps: steps.default(1),
    initial: z
      .strictObject({
        on: z.boolean(),
        stepsInState: z
          .number()
          .int()
          .min(0)
          .optional()
          .meta({ description: 'Steps the unit has already been in that state before step 0; absent: longer than any minimum.' }),
      })
      .prefault({ on: false })
      .meta({ description: 'Default: off for longer than any minimum.' }),
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
  })
  .register(siteSpecComponents, { id: 'StorageSpec' });

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
  solver: solverSchema.prefault({}),
});

export interface SpecIssue {
  pointer: string;
  message: string;
}

/** The rules that relate one field to another (SPEC.md §1 limits that zod shapes cannot express). */
function crossFieldIssues(spec: z.output<typeof baseSchema>): SpecIssue[] {
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

  const seen = new Map<string, string>();
  const claimId = (value: string, pointer: string) => {
    const first = seen.get(value);
    if (first) issues.push({ pointer, message: `id "${value}" is already used at ${first}; ids must be unique across units and storage` });
    else seen.set(value, pointer);
  };
  spec.units.forEach((u, i) => {
    claimId(u.id, `/units/${i}/id`);
    if (u.minStableKw > u.ratingKw) {
      issues.push({ pointer: `/units/${i}/minStableKw`, message: `${u.minStableKw} exceeds ratingKw ${u.ratingKw}` });
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

  const w = spec.solver.window;
  if (w.windowSteps !== undefined && w.commitSteps !== undefined && w.commitSteps > w.windowSteps) {
    issues.push({ pointer: '/solver/window/commitSteps', message: `${w.commitSteps} exceeds windowSteps ${w.windowSteps}` });
  }
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
      "The site spec v1 (SPEC.md §1). Powers kW, energies kWh, money in the tenant's currency. Beyond this schema the API " +
      'checks (400 with pointers): array lengths equal `horizon.steps`, `minStableKw ≤ ratingKw`, `minSocKwh ≤ initialSocKwh ≤ ' +
      'capacityKwh` (also `finalSocKwh`), ids unique across units and storage, `commitSteps ≤ windowSteps`, `segmentWindows` 0 ' +
      "or at least 2, a `seriesId` of your tenant with the horizon's step covering the horizon; the plan's caps on steps and " +
      'units (422). Extension points: `supply` is inline values or an uploaded series; prices are a number or one per step; ' +
      '`solver.reductions` switches each formulation technique; `solver.mode` and `solver.window` choose the rolling horizon. ' +
      'Unknown fields are refused.',
  })
  .register(siteSpecComponents, { id: 'SiteSpec' });

/** The spec as a client writes it (what `GET /v1/runs/{id}/spec` returns); supply may name an uploaded series. */
export type SiteSpec = z.input<typeof siteSpecSchema>;
/** A spec that passed validation, its constant defaults filled in. */
export type ValidSiteSpec = z.output<typeof siteSpecSchema>;

const resolvedUnitSchema = unitSchema.extend({
  /** "Off for longer than any minimum" is resolved to max(minUpSteps, minDownSteps) steps. */
  initial: z.strictObject({ on: z.boolean(), stepsInState: z.number().int().min(0) }),
});

const resolvedStorageSchema = storageSchema.extend({
  /** null: no final target. */
  finalSocKwh: nonNegative.nullable(),
});

/** The engine's input: supply resolved to numbers, every default applied, every price an array of `steps`. */
export const resolvedSiteSpecSchema = z.strictObject({
  name: z.string().nullable(),
  horizon: horizonSchema.extend({ stepMinutes: z.number().int() }),
  supply: z.strictObject({ availableKw: kwSeries }),
  /** Always present; no site load ⇒ zeros. `unservedPenaltyPerKwh` null ⇒ the load is hard. */
  siteLoad: siteLoadSchema.extend({ unservedPenaltyPerKwh: nonNegativeMoney.nullable() }),
  /** Always present; `island` true when the spec had no grid (then limits are 0). */
  grid: gridSchema.extend({ island: z.boolean(), importPrice: z.array(money), exportPrice: z.array(money) }),
  units: z.array(resolvedUnitSchema),
  storage: z.array(resolvedStorageSchema),
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

function priceArray(price: number | number[], T: number): number[] {
  return Array.isArray(price) ? price.slice() : new Array<number>(T).fill(price);
}

/**
 * Resolves the defaults that depend on other fields (SPEC.md §1): supply from the series values
 * the caller looked up (a spec with inline supply ignores `availableKw`), scalar prices to one per
 * step, no grid to an island, no site load to zeros, a unit's time in its initial state, the
 * rolling windows from the step length and the time limit from the horizon.
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
  return {
    name: spec.name ?? null,
    horizon: spec.horizon,
    supply: { availableKw: supply },
    siteLoad: {
      kw: spec.siteLoad ? spec.siteLoad.kw.slice() : new Array<number>(T).fill(0),
      unservedPenaltyPerKwh: spec.siteLoad?.unservedPenaltyPerKwh ?? null,
    },
    grid: { ...grid, island: !spec.grid, importPrice: priceArray(grid.importPrice, T), exportPrice: priceArray(grid.exportPrice, T) },
    units: spec.units.map((u) => ({
      ...u,
      initial: { on: u.initial.on, stepsInState: u.initial.stepsInState ?? Math.max(u.minUpSteps, u.minDownSteps) },
    })),
    storage: spec.storage.map((s) => ({ ...s, finalSocKwh: s.finalSocKwh ?? null })),
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
