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
export const MAX_STORES = 20;
export const MAX_CURVE_SLICES = 20;
export const MAX_DEMAND_CHARGES = 20;
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
  start: z.iso.datetime({ offset: true, error: 'must be an ISO 8601 date-time with a UTC offset, e.g. 2027-03-01T00:00:00+01:00' }),
  stepMinutes: z.union(STEP_MINUTES.map((m) => z.literal(m)), {
    error: `must be one of ${STEP_MINUTES.join(', ')}`,
  }),
  steps,
  timeZone: z
    .string()
    .min(1)
    .max(64)
    .refine(isKnownTimeZone, 'must be an IANA time-zone name such as "Europe/Vienna" or "Etc/GMT-1"')
    .optional(),
});

const supplySchema = z.union([
  z.strictObject({ availableKw: kwSeries }),
  z.strictObject({ seriesId: z.string().min(1).max(100) }),
], { error: 'must be { "availableKw": [kW per step] } or { "seriesId": "<an uploaded series>" }' });

const siteLoadSchema = z.strictObject({
  kw: kwSeries,
  unservedPenaltyPerKwh: nonNegativeMoney.optional(),
});

const clockTime = (allowEndOfDay: boolean) =>
  z
    .string()
    .regex(
      allowEndOfDay ? /^(([01]\d|2[0-3]):[0-5]\d|24:00)$/ : /^([01]\d|2[0-3]):[0-5]\d$/,
      allowEndOfDay ? 'must be a local time "HH:MM" from "00:00" to "24:00"' : 'must be a local time "HH:MM" from "00:00" to "23:59"',
    );

const demandChargeSchema = z.strictObject({
  id,
  pricePerKw: nonNegativeMoney,
  window: z
    .strictObject({
      /** ISO weekdays, 1 = Monday … 7 = Sunday, of the step's own local date. */
      daysOfWeek: z.array(z.number().int().min(1).max(7)).min(1).max(7).optional(),
      from: clockTime(false).optional(),
      to: clockTime(true).optional(),
    })
    .optional(),
  existingPeakKw: nonNegative.optional(),
});

const gridSchema = z.strictObject({
  importLimitKw: nonNegative.optional(),
  exportLimitKw: nonNegative.optional(),
  importPrice: priceSeries.optional(),
  exportPrice: priceSeries.optional(),
  demandCharges: z.array(demandChargeSchema).max(MAX_DEMAND_CHARGES).optional(),
});

const storeLink = z.strictObject({
  /** The id of an entry of `stores`. */
  store: id,
  /** Units of the store's product per kWh of the unit's power. */
  perKwh: positive,
});

const unitSchema = z.strictObject({
  id,
  kind: z.enum(['flexible-load', 'generator']),
  ratingKw: positive,
  minStableKw: nonNegative.optional(),
  valuePerKwh: money.optional(),
  costPerKwh: money.optional(),
  noLoadCostPerHour: nonNegativeMoney.optional(),
  costCurve: z.array(z.strictObject({ upToKw: positive, costPerKwh: money })).min(1).max(MAX_CURVE_SLICES).optional(),
  valueCurve: z.array(z.strictObject({ upToKw: positive, valuePerKwh: money })).min(1).max(MAX_CURVE_SLICES).optional(),
  startupCost: z
    .union([
      nonNegativeMoney,
      z.strictObject({ hot: nonNegativeMoney, cold: nonNegativeMoney, coldAfterSteps: z.number().int().min(0).max(MAX_STEPS) }),
    ])
    .optional(),
  minUpSteps: steps.optional(),
  minDownSteps: steps.optional(),
  rampUpKwPerMin: nonNegative.optional(),
  rampDownKwPerMin: nonNegative.optional(),
  initial: z
    .strictObject({
      on: z.boolean(),
      /** Steps the unit has already been in that state before step 0 (in the other state before that); absent ⇒ forever. */
      stepsInState: z.number().int().min(0).optional(),
      /** Output at step −1 of a unit that is on; the ramp limits apply from it. Absent ⇒ no ramp limit at step 0. */
      powerKw: nonNegative.optional(),
    })
    .optional(),
  providesReserve: z.boolean().optional(),
  produces: storeLink.optional(),
  consumes: storeLink.optional(),
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
  /** Never charged from the grid: import serves only the site load, flexible loads and other batteries. */
  chargeFromSupplyOnly: z.boolean().optional(),
  providesReserve: z.boolean().optional(),
});

const storeSchema = z.strictObject({
  id,
  /** Labels for people and exports, e.g. "hydrogen" and "kg". */
  product: z.string().min(1).max(64).optional(),
  unit: z.string().min(1).max(32).optional(),
  capacity: positive,
  min: nonNegative.optional(),
  initial: nonNegative,
  final: nonNegative.optional(),
  /** Drawn every hour, in the store's unit per hour: one figure, or one per step. */
  demandPerHour: z.union([nonNegative, z.array(nonNegative).min(1).max(MAX_STEPS)]).optional(),
  /** Fraction of the level lost per hour. */
  lossPerHour: z.number().min(0).max(1).optional(),
  shortfallPenaltyPerUnit: nonNegativeMoney.optional(),
  spillAllowed: z.boolean().optional(),
});

const reserveSchema = z.strictObject({
  upKw: z.union([nonNegative, z.array(nonNegative).min(1).max(MAX_STEPS)]),
  shortfallPenaltyPerKwh: nonNegativeMoney.optional(),
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
  stores: z.array(storeSchema).max(MAX_STORES).default([]),
  reserve: reserveSchema.optional(),
  solver: solverSchema.optional(),
});

type BaseSpec = z.infer<typeof baseSchema>;

export interface SpecIssue {
  pointer: string;
  message: string;
}

/** The rules that relate one field to another (SPEC.md §1 and §5 limits that zod shapes cannot express). */
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
    if (u.minStableKw !== undefined && u.minStableKw > u.ratingKw) {
      issues.push({ pointer: `${at}/minStableKw`, message: `${u.minStableKw} exceeds ratingKw ${u.ratingKw}` });
    }
    issues.push(...curveIssues(u, at));
    if (typeof u.startupCost === 'object' && u.startupCost.cold < u.startupCost.hot) {
      issues.push({ pointer: `${at}/startupCost/cold`, message: `${u.startupCost.cold} is below hot ${u.startupCost.hot}; a cold start costs at least a hot one` });
    }
    const p0 = u.initial?.powerKw;
    if (p0 !== undefined) {
      if (!u.initial!.on && p0 > 0) {
        issues.push({ pointer: `${at}/initial/powerKw`, message: `${p0} kW, but the unit is off at the start (initial.on false); an off unit runs at 0 kW` });
      } else if (u.initial!.on && (p0 > u.ratingKw || p0 < (u.minStableKw ?? 0))) {
        issues.push({ pointer: `${at}/initial/powerKw`, message: `${p0} kW must lie within [minStableKw ${u.minStableKw ?? 0}, ratingKw ${u.ratingKw}] for a unit that is on` });
      }
    }
    for (const link of ['produces', 'consumes'] as const) {
      const target = u[link]?.store;
      if (target !== undefined && !storeIds.has(target)) {
        issues.push({ pointer: `${at}/${link}/store`, message: `no store "${target}" in stores` });
      }
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
  spec.stores.forEach((s, i) => {
    const at = `/stores/${i}`;
    claimId(s.id, `${at}/id`);
    const min = s.min ?? 0;
    if (min > s.capacity) issues.push({ pointer: `${at}/min`, message: `${min} exceeds capacity ${s.capacity}` });
    if (s.initial < min || s.initial > s.capacity) {
      issues.push({ pointer: `${at}/initial`, message: `${s.initial} must lie within [min ${min}, capacity ${s.capacity}]` });
    }
    if (s.final !== undefined && (s.final < min || s.final > s.capacity)) {
      issues.push({ pointer: `${at}/final`, message: `${s.final} must lie within [min ${min}, capacity ${s.capacity}]` });
    }
    lengthIs(`${at}/demandPerHour`, s.demandPerHour);
  });
  const chargeIds = new Map<string, number>();
  spec.grid?.demandCharges?.forEach((c, i) => {
    const first = chargeIds.get(c.id);
    if (first !== undefined) issues.push({ pointer: `/grid/demandCharges/${i}/id`, message: `id "${c.id}" is already used at /grid/demandCharges/${first}/id` });
    else chargeIds.set(c.id, i);
    const days = c.window?.daysOfWeek;
    if (days && new Set(days).size !== days.length) {
      issues.push({ pointer: `/grid/demandCharges/${i}/window/daysOfWeek`, message: 'lists a weekday twice' });
    }
  });

  const w = spec.solver?.window;
  if (w?.windowSteps !== undefined && w.commitSteps !== undefined && w.commitSteps > w.windowSteps) {
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
  const check = (field: 'costCurve' | 'valueCurve', slices: { upToKw: number; price: number }[], kind: 'generator' | 'flexible-load', single: 'costPerKwh' | 'valuePerKwh') => {
    if (u.kind !== kind) {
      issues.push({ pointer: `${at}/${field}`, message: `is for ${kind}s; a ${u.kind} uses ${u.kind === 'generator' ? 'costCurve' : 'valueCurve'}` });
      return;
    }
    if (u[single] !== undefined) issues.push({ pointer: `${at}/${single}`, message: `give ${single} or ${field}, not both: the curve replaces it` });
    slices.forEach((slice, k) => {
      if (k > 0 && slice.upToKw <= slices[k - 1].upToKw) {
        issues.push({ pointer: `${at}/${field}/${k}/upToKw`, message: `${slice.upToKw} must be above the previous slice's upToKw ${slices[k - 1].upToKw}` });
      }
      const bad = field === 'costCurve' ? k > 0 && slice.price < slices[k - 1].price : k > 0 && slice.price > slices[k - 1].price;
      if (bad) {
        const rule = field === 'costCurve' ? 'costs must not fall from one slice to the next (a convex curve)' : 'values must not rise from one slice to the next (a concave curve)';
        issues.push({ pointer: `${at}/${field}/${k}/${field === 'costCurve' ? 'costPerKwh' : 'valuePerKwh'}`, message: `${slice.price} after ${slices[k - 1].price}: ${rule}` });
      }
    });
    const last = slices.length - 1;
    if (slices[last].upToKw !== u.ratingKw) {
      issues.push({ pointer: `${at}/${field}/${last}/upToKw`, message: `${slices[last].upToKw} must equal ratingKw ${u.ratingKw}: the last slice ends at the rating` });
    }
  };
  if (u.costCurve) check('costCurve', u.costCurve.map((s) => ({ upToKw: s.upToKw, price: s.costPerKwh })), 'generator', 'costPerKwh');
  if (u.valueCurve) check('valueCurve', u.valueCurve.map((s) => ({ upToKw: s.upToKw, price: s.valuePerKwh })), 'flexible-load', 'valuePerKwh');
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

/** One slice of a unit's output from the previous slice's `upToKw` (0 for the first): its incremental cost (generators) or value (flexible loads) per kWh. */
export interface ResolvedSlice {
  upToKw: number;
  perKwh: number;
}

/** A unit's link to a store: `perKwh` units of the store's product per kWh of the unit's power. */
export interface ResolvedStoreLink {
  /** Index into `stores`. */
  store: number;
  perKwh: number;
}

export interface ResolvedUnit {
  id: string;
  kind: 'flexible-load' | 'generator';
  ratingKw: number;
  minStableKw: number;
  /**
   * The unit's energy price as slices of output from 0 kW (SPEC §5): costs for generators
   * (non-decreasing), values for flexible loads (non-increasing); the last slice ends at the
   * rating. A v1 `costPerKwh` / `valuePerKwh` is one slice.
   */
  curve: ResolvedSlice[];
  noLoadCostPerHour: number;
  /** A v1 number is `hot = cold`; `coldAfterSteps` null then (every start costs the same). */
  startupCost: { hot: number; cold: number; coldAfterSteps: number | null };
  /** null: no ramp limit in that direction. */
  rampUpKwPerMin: number | null;
  rampDownKwPerMin: number | null;
  minUpSteps: number;
  minDownSteps: number;
  /**
   * `stepsInState` is always a number here: "forever" becomes the longest history any rule
   * looks back over (`stateMemorySteps`). `powerKw` null: no ramp limit at step 0.
   */
  initial: { on: boolean; stepsInState: number; powerKw: number | null };
  providesReserve: boolean;
  produces: ResolvedStoreLink | null;
  consumes: ResolvedStoreLink | null;
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
  chargeFromSupplyOnly: boolean;
  providesReserve: boolean;
}

export interface ResolvedStore {
  id: string;
  product: string | null;
  unit: string | null;
  capacity: number;
  min: number;
  initial: number;
  /** null: no final target. */
  final: number | null;
  /** Per step, in the store's unit per hour. */
  demandPerHour: number[];
  lossPerHour: number;
  /** null: the demand is hard. */
  shortfallPenaltyPerUnit: number | null;
  spillAllowed: boolean;
}

export interface ResolvedDemandCharge {
  id: string;
  pricePerKw: number;
  existingPeakKw: number;
  /** Local time of the horizon's zone; every field resolved (all days, "00:00", "24:00"). */
  window: { daysOfWeek: number[]; from: string; to: string };
}

/** The engine's input: supply resolved to numbers, every default applied, every price an array of `steps`. */
export interface ResolvedSiteSpec {
  name: string | null;
  /** `timeZone` null: local time is the start's fixed UTC offset. */
  horizon: { start: string; stepMinutes: number; steps: number; timeZone: string | null };
  supply: { availableKw: number[] };
  /** Always present; no site load ⇒ zeros. `unservedPenaltyPerKwh` null ⇒ the load is hard. */
  siteLoad: { kw: number[]; unservedPenaltyPerKwh: number | null };
  /** Always present; `island` true when the spec had no grid (then limits are 0). */
  grid: {
    island: boolean;
    importLimitKw: number;
    exportLimitKw: number;
    importPrice: number[];
    exportPrice: number[];
    demandCharges: ResolvedDemandCharge[];
  };
  units: ResolvedUnit[];
  storage: ResolvedStorage[];
  stores: ResolvedStore[];
  /** null: no spinning reserve requirement. `shortfallPenaltyPerKwh` null ⇒ the reserve is hard. */
  reserve: { upKw: number[]; shortfallPenaltyPerKwh: number | null } | null;
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

function perStepArray(value: number | number[] | undefined, T: number): number[] {
  if (Array.isArray(value)) return value.slice();
  return new Array<number>(T).fill(value ?? 0);
}

function resolveCurve(u: UnitSpec): ResolvedSlice[] {
  if (u.kind === 'generator' && u.costCurve) return u.costCurve.map((s) => ({ upToKw: s.upToKw, perKwh: s.costPerKwh }));
  if (u.kind === 'flexible-load' && u.valueCurve) return u.valueCurve.map((s) => ({ upToKw: s.upToKw, perKwh: s.valuePerKwh }));
  return [{ upToKw: u.ratingKw, perKwh: (u.kind === 'generator' ? u.costPerKwh : u.valuePerKwh) ?? 0 }];
}

function resolveUnit(u: UnitSpec, storeIndex: Map<string, number>): ResolvedUnit {
  const startupCost =
    typeof u.startupCost === 'object'
      ? { hot: u.startupCost.hot, cold: u.startupCost.cold, coldAfterSteps: u.startupCost.coldAfterSteps }
      : { hot: u.startupCost ?? 0, cold: u.startupCost ?? 0, coldAfterSteps: null };
  const minUpSteps = u.minUpSteps ?? 1;
  const minDownSteps = u.minDownSteps ?? 1;
  const link = (l: UnitSpec['produces']): ResolvedStoreLink | null => (l ? { store: storeIndex.get(l.store)!, perKwh: l.perKwh } : null);
  const on = u.initial?.on ?? false;
  return {
    id: u.id,
    kind: u.kind,
    ratingKw: u.ratingKw,
    minStableKw: u.minStableKw ?? 0,
    curve: resolveCurve(u),
    noLoadCostPerHour: u.noLoadCostPerHour ?? 0,
    startupCost,
    rampUpKwPerMin: u.rampUpKwPerMin ?? null,
    rampDownKwPerMin: u.rampDownKwPerMin ?? null,
    minUpSteps,
    minDownSteps,
    initial: {
      on,
      stepsInState: u.initial?.stepsInState ?? stateMemorySteps({ minUpSteps, minDownSteps, startupCost }),
      powerKw: on ? (u.initial?.powerKw ?? null) : null,
    },
    providesReserve: u.providesReserve ?? u.kind === 'generator',
    produces: link(u.produces),
    consumes: link(u.consumes),
  };
}

/**
 * Applies every default of SPEC.md §1 and §5. A spec whose supply names a series needs its values in
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
  const storeIndex = new Map(spec.stores.map((s, i) => [s.id, i]));

  return {
    name: spec.name ?? null,
    horizon: { start: spec.horizon.start, stepMinutes, steps: T, timeZone: spec.horizon.timeZone ?? null },
    supply: { availableKw: supply },
    siteLoad: spec.siteLoad
      ? { kw: spec.siteLoad.kw.slice(), unservedPenaltyPerKwh: spec.siteLoad.unservedPenaltyPerKwh ?? null }
      : { kw: new Array<number>(T).fill(0), unservedPenaltyPerKwh: null },
    grid: {
      island: !spec.grid,
      importLimitKw: spec.grid?.importLimitKw ?? 0,
      exportLimitKw: spec.grid?.exportLimitKw ?? 0,
      importPrice: perStepArray(spec.grid?.importPrice, T),
      exportPrice: perStepArray(spec.grid?.exportPrice, T),
      demandCharges: (spec.grid?.demandCharges ?? []).map((c) => ({
        id: c.id,
        pricePerKw: c.pricePerKw,
        existingPeakKw: c.existingPeakKw ?? 0,
        window: {
          daysOfWeek: c.window?.daysOfWeek?.slice().sort((a, b) => a - b) ?? [1, 2, 3, 4, 5, 6, 7],
          from: c.window?.from ?? '00:00',
          to: c.window?.to ?? '24:00',
        },
      })),
    },
    units: spec.units.map((u) => resolveUnit(u, storeIndex)),
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
      chargeFromSupplyOnly: s.chargeFromSupplyOnly ?? false,
      providesReserve: s.providesReserve ?? true,
    })),
    stores: spec.stores.map((s) => ({
      id: s.id,
      product: s.product ?? null,
      unit: s.unit ?? null,
      capacity: s.capacity,
      min: s.min ?? 0,
      initial: s.initial,
      final: s.final ?? null,
      demandPerHour: perStepArray(s.demandPerHour, T),
      lossPerHour: s.lossPerHour ?? 0,
      shortfallPenaltyPerUnit: s.shortfallPenaltyPerUnit ?? null,
      spillAllowed: s.spillAllowed ?? false,
    })),
    reserve: spec.reserve
      ? { upKw: perStepArray(spec.reserve.upKw, T), shortfallPenaltyPerKwh: spec.reserve.shortfallPenaltyPerKwh ?? null }
      : null,
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
