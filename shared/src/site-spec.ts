/**
 * The site spec v1 (SPEC.md §1): the zod schema both the API and the console validate with,
 * the cross-field rules, and the resolution of every default into the engine's input.
 * Isomorphic on purpose — no node imports.
 */
import { z } from 'zod';
import { buildPointer, parsePointer } from './json-pointer';

export const MAX_STEPS = 35_136;
export const MAX_UNITS = 50;
export const MAX_STORAGE = 20;
export const STEP_MINUTES = [5, 10, 15, 30, 60] as const;
export const MAX_TIME_LIMIT_SECONDS = 3_600;
export const DEFAULT_TIME_LIMIT_SECONDS = 60;

/**
 * The time limit when a spec names none: 60 s, growing with the horizon so a rolling year
 * (35 040 steps ⇒ 584 s) has about 1.6 s per daily window even on a busy machine.
 */
export function defaultTimeLimitSeconds(steps: number): number {
  return Math.min(MAX_TIME_LIMIT_SECONDS, Math.max(DEFAULT_TIME_LIMIT_SECONDS, Math.ceil(steps / 60)));
}
export const DEFAULT_MIP_GAP = 1e-4;
/**
 * Rolling windows per parallel segment: a horizon of at least twice this many windows is cut
 * into segments of about this many, solved side by side (a month of daily windows each).
 */
export const DEFAULT_SEGMENT_WINDOWS = 32;
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
const nonNegativeMoney = money.refine((v) => v >= 0, 'must be at least 0');
const kwSeries = z.array(nonNegative).min(1).max(MAX_STEPS);
const priceSeries = z.union([money, z.array(money).min(1).max(MAX_STEPS)]);
const id = z
  .string()
  .min(1)
  .max(64)
  .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, 'must start with a letter or digit and use only letters, digits, ".", "_" and "-"');
const steps = z.number().int().min(1).max(MAX_STEPS);

const horizonSchema = z.strictObject({
  start: z.iso.datetime({ offset: true, error: 'must be an ISO 8601 date-time with a UTC offset, e.g. 2027-03-01T00:00:00+01:00' }),
  stepMinutes: z.union(STEP_MINUTES.map((m) => z.literal(m)), {
    error: `must be one of ${STEP_MINUTES.join(', ')}`,
  }),
  steps,
});

const supplySchema = z.union([
  z.strictObject({ availableKw: kwSeries }),
  z.strictObject({ seriesId: z.string().min(1).max(100) }),
], { error: 'must be { "availableKw": [kW per step] } or { "seriesId": "<an uploaded series>" }' });

const siteLoadSchema = z.strictObject({
  kw: kwSeries,
  unservedPenaltyPerKwh: nonNegativeMoney.optional(),
});

const gridSchema = z.strictObject({
  importLimitKw: nonNegative.optional(),
  exportLimitKw: nonNegative.optional(),
  importPrice: priceSeries.optional(),
  exportPrice: priceSeries.optional(),
});

const unitSchema = z.strictObject({
  id,
  kind: z.enum(['flexible-load', 'generator']),
  ratingKw: positive,
  minStableKw: nonNegative.optional(),
  valuePerKwh: money.optional(),
  costPerKwh: money.optional(),
  startupCost: nonNegativeMoney.optional(),
  minUpSteps: steps.optional(),
  minDownSteps: steps.optional(),
  initial: z
    .strictObject({
      on: z.boolean(),
      /** Steps the unit has already been in that state before step 0; absent ⇒ longer than any minimum. */
      stepsInState: z.number().int().min(0).optional(),
    })
    .optional(),
});

/** SPEC.md §1 allows (0, 1]; below 0.1 % the SOC equation's coefficients leave the solver's range. */
const efficiency = z.number().min(1e-3, 'must be in (0, 1] and at least 0.001').max(1);

const storageSchema = z.strictObject({
  id,
  capacityKwh: positive,
  maxChargeKw: nonNegative,
  maxDischargeKw: nonNegative,
  chargeEfficiency: efficiency.optional(),
  dischargeEfficiency: efficiency.optional(),
  minSocKwh: nonNegative.optional(),
  initialSocKwh: nonNegative,
  finalSocKwh: nonNegative.optional(),
  cycleCostPerKwh: nonNegativeMoney.optional(),
});

const reductionsSchema = z.strictObject({
  sparseSets: z.boolean().optional(),
  tightBigM: z.boolean().optional(),
  scaling: z.boolean().optional(),
  relaxExclusivity: z.boolean().optional(),
  independentBlocks: z.boolean().optional(),
});

const solverSchema = z.strictObject({
  mode: z.enum(['auto', 'monolithic', 'rolling']).optional(),
  window: z
    .strictObject({
      windowSteps: steps.optional(),
      commitSteps: steps.optional(),
      segmentWindows: z.number().int().min(0).max(MAX_STEPS).refine((v) => v === 0 || v >= 2, 'must be 0 (one sequence) or at least 2').optional(),
      lookahead: z.enum(['relaxed', 'integer']).optional(),
    })
    .optional(),
  /** Wall-clock limit for the whole run (all windows together in rolling mode). */
  timeLimitSeconds: z.number().positive().max(MAX_TIME_LIMIT_SECONDS).optional(),
  mipGap: z.number().min(0).max(1).optional(),
  reductions: reductionsSchema.optional(),
});

const baseSchema = z.strictObject({
  name: z.string().max(200).optional(),
  horizon: horizonSchema,
  supply: supplySchema,
  siteLoad: siteLoadSchema.optional(),
  grid: gridSchema.optional(),
  units: z.array(unitSchema).max(MAX_UNITS).default([]),
  storage: z.array(storageSchema).max(MAX_STORAGE).default([]),
  solver: solverSchema.optional(),
});

type BaseSpec = z.infer<typeof baseSchema>;

export interface SpecIssue {
  pointer: string;
  message: string;
}

/** The rules that relate one field to another (SPEC.md §1 limits that zod shapes cannot express). */
export function crossFieldIssues(spec: BaseSpec): SpecIssue[] {
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
    if (u.minStableKw !== undefined && u.minStableKw > u.ratingKw) {
      issues.push({ pointer: `/units/${i}/minStableKw`, message: `${u.minStableKw} exceeds ratingKw ${u.ratingKw}` });
    }
  });
  spec.storage.forEach((s, i) => {
    claimId(s.id, `/storage/${i}/id`);
    const minSoc = s.minSocKwh ?? 0;
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

  const w = spec.solver?.window;
  if (w?.windowSteps !== undefined && w.commitSteps !== undefined && w.commitSteps > w.windowSteps) {
    issues.push({ pointer: '/solver/window/commitSteps', message: `${w.commitSteps} exceeds windowSteps ${w.windowSteps}` });
  }
  return issues;
}

export const siteSpecSchema = baseSchema.superRefine((spec, ctx) => {
  for (const issue of crossFieldIssues(spec)) {
    ctx.addIssue({ code: 'custom', message: issue.message, path: pointerToPath(issue.pointer) });
  }
});

function pointerToPath(pointer: string): (string | number)[] {
  return parsePointer(pointer).map((s) => (/^\d+$/.test(s) ? Number(s) : s));
}

/** The spec as submitted (supply may still name an uploaded series). */
export type SiteSpec = z.infer<typeof siteSpecSchema>;
export type UnitSpec = SiteSpec['units'][number];
export type StorageSpec = SiteSpec['storage'][number];
export type SolverMode = 'auto' | 'monolithic' | 'rolling';

export interface Reductions {
  sparseSets: boolean;
  tightBigM: boolean;
  scaling: boolean;
  relaxExclusivity: boolean;
  independentBlocks: boolean;
}

export interface ResolvedUnit {
  id: string;
  kind: 'flexible-load' | 'generator';
  ratingKw: number;
  minStableKw: number;
  valuePerKwh: number;
  costPerKwh: number;
  startupCost: number;
  minUpSteps: number;
  minDownSteps: number;
  /** `stepsInState` is always a number here: "off for longer than any minimum" becomes max(minUp, minDown). */
  initial: { on: boolean; stepsInState: number };
}

export interface ResolvedStorage {
  id: string;
  capacityKwh: number;
  maxChargeKw: number;
  maxDischargeKw: number;
  chargeEfficiency: number;
  dischargeEfficiency: number;
  minSocKwh: number;
  initialSocKwh: number;
  /** null: no final target. */
  finalSocKwh: number | null;
  cycleCostPerKwh: number;
}

/** The engine's input: supply resolved to numbers, every default applied, every price an array of `steps`. */
export interface ResolvedSiteSpec {
  name: string | null;
  horizon: { start: string; stepMinutes: number; steps: number };
  supply: { availableKw: number[] };
  /** Always present; no site load ⇒ zeros. `unservedPenaltyPerKwh` null ⇒ the load is hard. */
  siteLoad: { kw: number[]; unservedPenaltyPerKwh: number | null };
  /** Always present; `island` true when the spec had no grid (then limits are 0). */
  grid: { island: boolean; importLimitKw: number; exportLimitKw: number; importPrice: number[]; exportPrice: number[] };
  units: ResolvedUnit[];
  storage: ResolvedStorage[];
  solver: {
    mode: SolverMode;
    /**
     * `segmentWindows` 0: one sequence of windows, never split into parallel segments.
     * `lookahead` "relaxed": binaries after a window's committed steps are relaxed to [0, 1].
     */
    window: { windowSteps: number; commitSteps: number; segmentWindows: number; lookahead: 'relaxed' | 'integer' };
    timeLimitSeconds: number;
    mipGap: number;
    reductions: Reductions;
  };
}

export interface SpecLimits {
  maxSteps?: number;
  maxUnits?: number;
}

export type SpecValidation = { ok: true; spec: SiteSpec } | { ok: false; errors: SpecIssue[] };

/** Validates against SPEC.md §1 (and a plan's lower caps); every error carries an RFC 6901 pointer. */
export function validateSiteSpec(input: unknown, limits: SpecLimits = {}): SpecValidation {
  const parsed = siteSpecSchema.safeParse(input);
  if (!parsed.success) {
    const errors = parsed.error.issues.slice(0, MAX_REPORTED_ERRORS).map((issue) => ({
      pointer: buildPointer(issue.path),
      message: issue.message,
    }));
    return { ok: false, errors };
  }
  const spec = parsed.data;
  const errors: SpecIssue[] = [];
  if (limits.maxSteps !== undefined && spec.horizon.steps > limits.maxSteps) {
    errors.push({ pointer: '/horizon/steps', message: `${spec.horizon.steps} exceeds your plan's limit of ${limits.maxSteps} steps` });
  }
  if (limits.maxUnits !== undefined && spec.units.length > limits.maxUnits) {
    errors.push({ pointer: '/units', message: `${spec.units.length} units exceed your plan's limit of ${limits.maxUnits}` });
  }
  return errors.length ? { ok: false, errors } : { ok: true, spec };
}

/** Steps in `hours` hours at this step length (at least one). */
export function stepsInHours(hours: number, stepMinutes: number): number {
  return Math.max(1, Math.round((hours * 60) / stepMinutes));
}

function priceArray(price: number | number[] | undefined, T: number): number[] {
  if (Array.isArray(price)) return price.slice();
  return new Array<number>(T).fill(price ?? 0);
}

/**
 * Applies every default of SPEC.md §1. A spec whose supply names a series needs its values in
 * `availableKw` (looked up by the caller); a spec with inline supply ignores the argument.
 */
export function resolveDefaults(spec: SiteSpec, availableKw?: number[]): ResolvedSiteSpec {
  const T = spec.horizon.steps;
  let supply: number[];
  if ('availableKw' in spec.supply) supply = spec.supply.availableKw.slice();
  else if (availableKw) supply = availableKw.slice();
  else throw new Error(`supply.seriesId "${spec.supply.seriesId}" needs its values to resolve the spec`);
  if (supply.length !== T) throw new Error(`supply has ${supply.length} values; horizon.steps is ${T}`);

  const stepMinutes = spec.horizon.stepMinutes;
  const windowSteps = spec.solver?.window?.windowSteps ?? stepsInHours(36, stepMinutes);
  const commitSteps = spec.solver?.window?.commitSteps ?? Math.min(windowSteps, stepsInHours(24, stepMinutes));
  const segmentWindows = spec.solver?.window?.segmentWindows ?? DEFAULT_SEGMENT_WINDOWS;
  const lookahead = spec.solver?.window?.lookahead ?? 'relaxed';
  const r = spec.solver?.reductions;

  return {
    name: spec.name ?? null,
    horizon: { start: spec.horizon.start, stepMinutes, steps: T },
    supply: { availableKw: supply },
    siteLoad: spec.siteLoad
      ? { kw: spec.siteLoad.kw.slice(), unservedPenaltyPerKwh: spec.siteLoad.unservedPenaltyPerKwh ?? null }
      : { kw: new Array<number>(T).fill(0), unservedPenaltyPerKwh: null },
    grid: {
      island: !spec.grid,
      importLimitKw: spec.grid?.importLimitKw ?? 0,
      exportLimitKw: spec.grid?.exportLimitKw ?? 0,
      importPrice: priceArray(spec.grid?.importPrice, T),
      exportPrice: priceArray(spec.grid?.exportPrice, T),
    },
    units: spec.units.map((u) => {
      const minUpSteps = u.minUpSteps ?? 1;
      const minDownSteps = u.minDownSteps ?? 1;
      return {
        id: u.id,
        kind: u.kind,
        ratingKw: u.ratingKw,
        minStableKw: u.minStableKw ?? 0,
        valuePerKwh: u.valuePerKwh ?? 0,
        costPerKwh: u.costPerKwh ?? 0,
        startupCost: u.startupCost ?? 0,
        minUpSteps,
        minDownSteps,
        initial: {
          on: u.initial?.on ?? false,
          stepsInState: u.initial?.stepsInState ?? Math.max(minUpSteps, minDownSteps),
        },
      };
    }),
    storage: spec.storage.map((s) => ({
      id: s.id,
      capacityKwh: s.capacityKwh,
      maxChargeKw: s.maxChargeKw,
      maxDischargeKw: s.maxDischargeKw,
      chargeEfficiency: s.chargeEfficiency ?? 1,
      dischargeEfficiency: s.dischargeEfficiency ?? 1,
      minSocKwh: s.minSocKwh ?? 0,
      initialSocKwh: s.initialSocKwh,
      finalSocKwh: s.finalSocKwh ?? null,
      cycleCostPerKwh: s.cycleCostPerKwh ?? 0,
    })),
    solver: {
      mode: spec.solver?.mode ?? 'auto',
      window: { windowSteps, commitSteps, segmentWindows, lookahead },
      timeLimitSeconds: spec.solver?.timeLimitSeconds ?? defaultTimeLimitSeconds(spec.horizon.steps),
      mipGap: spec.solver?.mipGap ?? DEFAULT_MIP_GAP,
      reductions: {
        sparseSets: r?.sparseSets ?? true,
        tightBigM: r?.tightBigM ?? true,
        scaling: r?.scaling ?? true,
        relaxExclusivity: r?.relaxExclusivity ?? true,
        independentBlocks: r?.independentBlocks ?? true,
      },
    },
  };
}
