/**
 * The result of a run (SPEC.md §3) — what the engine returns and the CLI prints — and the run as
 * `GET /v1/runs/{id}` shows it: zod schemas, the types inferred from them, and the JSON Schema in
 * `openapi/openapi.yaml` generated from them (`npm run gen:openapi`). Isomorphic — no node imports.
 */
import { z } from 'zod';
import { reductionsSchema } from './site-spec';

/**
 * The named parts of the result and the run, as `openapi/openapi.yaml` lists them under
 * `components/schemas` (response bodies: generated with `io: 'output'`).
 */
export const runComponents = z.registry<{ id: string }>();

/** A run's states, in the order a run passes through them: queued → running → one of the last three. */
export const RUN_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export const runStatusSchema = z.enum(RUN_STATUSES).register(runComponents, { id: 'RunStatus' });
export type RunStatus = z.infer<typeof runStatusSchema>;

const solveOutcomeSchema = z
  .enum(['optimal', 'feasible', 'infeasible', 'no-solution'])
  .meta({ description: '`no-solution`: the time limit was hit before any feasible schedule was found.' })
  .register(runComponents, { id: 'SolveOutcome' });
export type SolveOutcome = z.infer<typeof solveOutcomeSchema>;

const objectiveSchema = z.object({
  value: z
    .number()
    .nullable()
    .meta({ description: 'The SPEC.md §2 objective evaluated on the returned schedule; null when there is no schedule.' }),
  bound: z.number().nullable().meta({
    description:
      'A proven upper bound on the objective of any schedule the spec allows: the solver’s dual bound when one model covers ' +
      'the horizon; for a rolling solve, the horizon bound of `model.horizonBound` (a decomposition of the horizon into ' +
      'blocks whose links are relaxed and priced). null when unknown.',
  }),
  gap: z.number().nullable().meta({ description: 'Relative gap |bound − value| / |value|; null when the bound is unknown.' }),
});
export type ObjectiveReport = z.infer<typeof objectiveSchema>;

const count = z.number().int().min(0);

const unitKpisSchema = z.object({
  energyKwh: z.number(),
  starts: count,
  coldStarts: count.meta({
    description: 'Starts after more than `coldAfterSteps` steps off (0 for a unit with one start cost: every start counts as hot).',
  }),
  onSteps: count,
});
export type UnitKpis = z.infer<typeof unitKpisSchema>;
const storageKpisSchema = z.object({ chargedKwh: z.number(), dischargedKwh: z.number(), finalSocKwh: z.number() });
export type StorageKpis = z.infer<typeof storageKpisSchema>;

const storeKpisSchema = z
  .object({
    produced: z.number(),
    consumed: z.number(),
    inflow: z.number().meta({ description: 'What arrived from outside (inflowPerHour).' }),
    delivered: z.number().meta({ description: 'The demand met: the demand less the shortfall.' }),
    shortfall: z.number(),
    spilled: z.number(),
    finalLevel: z.number(),
  })
  .meta({ description: "Totals of one store over the horizon, in the store's own unit (fuel, water, hydrogen…)." });
export type StoreKpis = z.infer<typeof storeKpisSchema>;

const demandChargeKpisSchema = z.object({
  peakKw: z.number().meta({ description: "The highest import in the charge's window, at least its existingPeakKw." }),
  cost: z.number().meta({ description: 'pricePerKw × (peakKw − existingPeakKw).' }),
});
export type DemandChargeKpis = z.infer<typeof demandChargeKpisSchema>;

export const objectiveTermsSchema = z
  .object({
    energy: z.number().meta({ description: "Export revenue − import cost + flexible loads' value − generators' energy cost (their curves)." }),
    noLoad: z.number(),
    starts: z.number(),
    demandCharges: z.number(),
    penalties: z.number().meta({ description: 'Unserved load, reserve shortfall and store shortfall, each at its penalty.' }),
    cycleCost: z.number(),
  })
  .meta({
    description:
      'Where the money goes: each a signed contribution to `objective.value` (value positive, cost negative); together they sum to it.',
  })
  .register(runComponents, { id: 'ObjectiveTerms' });
export type ObjectiveTerms = z.infer<typeof objectiveTermsSchema>;

const kpisSchema = z
  .object({
    suppliedKwh: z.number(),
    curtailedKwh: z.number(),
    importKwh: z.number(),
    exportKwh: z.number(),
    unservedKwh: z.number(),
    reserveShortfallKwh: z.number().meta({ description: 'Spinning reserve short of the requirement, in kWh (0 without a requirement).' }),
    units: z.record(z.string(), unitKpisSchema),
    storage: z.record(z.string(), storageKpisSchema),
    stores: z.record(z.string(), storeKpisSchema),
    demandCharges: z.record(z.string(), demandChargeKpisSchema),
    objectiveTerms: objectiveTermsSchema,
  })
  .register(runComponents, { id: 'Kpis' });
export type Kpis = z.infer<typeof kpisSchema>;

const perStep = z.array(z.number());

const reserveHeld = perStep.meta({
  description: 'Spinning reserve held per step (headroom); present when the spec requires reserve and this asset provides it.',
});

const unitScheduleSchema = z.object({
  on: z.array(z.number().int().min(0).max(1)).meta({ description: '0 or 1 per step.' }),
  powerKw: perStep,
  reserveKw: reserveHeld.optional(),
});
export type UnitSchedule = z.infer<typeof unitScheduleSchema>;
const storageScheduleSchema = z.object({
  chargeKw: perStep,
  dischargeKw: perStep,
  socKwh: perStep.meta({ description: 'State of charge at the end of each step.' }),
  reserveKw: reserveHeld.optional(),
});
export type StorageSchedule = z.infer<typeof storageScheduleSchema>;

const storeScheduleSchema = z.object({
  level: perStep.meta({ description: "Level at the end of each step, in the store's unit." }),
  shortfall: perStep.meta({ description: "Demand not met per step, in the store's unit per hour." }),
  spill: perStep.meta({ description: "Product discarded per step, in the store's unit per hour." }),
});
export type StoreSchedule = z.infer<typeof storeScheduleSchema>;

const reserveScheduleSchema = z
  .object({
    requiredKw: perStep,
    providedKw: perStep.meta({ description: 'What the units and batteries that provide reserve hold: their headroom, summed.' }),
    shortfallKw: perStep,
  })
  .nullable()
  .meta({ description: 'Spinning reserve per step; null when the spec has no reserve requirement.' });
export type ReserveSchedule = NonNullable<z.infer<typeof reserveScheduleSchema>>;

const priced = z.array(z.number().nullable());
const marginalValuesSchema = z
  .object({
    energyPerKwh: priced,
    stores: z.record(z.string(), priced),
  })
  .meta({
    description:
      'Marginal values from the LP with every on/off and exclusivity decision fixed at the schedule’s (the duals of the ' +
      'energy balance and of each store’s level): what one more kWh delivered to the site, or one more unit put into a ' +
      'store, is worth at that step, in money per kWh (per store unit). null where no price is known.',
  });
export type MarginalValues = z.infer<typeof marginalValuesSchema>;

const scheduleSchema = z
  .object({
    timestamps: z
      .array(z.iso.datetime({ offset: true }))
      .meta({ description: "Start of each step, ISO 8601 with the local offset (horizon.timeZone's, or the start's own)." }),
    supplyUsedKw: perStep,
    curtailedKw: perStep,
    unservedKw: perStep,
    grid: z.object({ importKw: perStep, exportKw: perStep }),
    units: z.record(z.string(), unitScheduleSchema),
    storage: z.record(z.string(), storageScheduleSchema),
    stores: z.record(z.string(), storeScheduleSchema),
    reserve: reserveScheduleSchema,
    marginalValues: marginalValuesSchema,
  })
  .meta({
    description:
      "Per-step values; `timestamps` are the starts of the steps in local time (the spec's `horizon.timeZone`, or the start's " +
      'offset). Advisory — an operator approves setpoints.',
  })
  .register(runComponents, { id: 'Schedule' });
export type Schedule = z.infer<typeof scheduleSchema>;

const windowReportSchema = z.object({
  kind: z.enum(['window', 'seam-probe']).meta({
    description:
      '`window`: a model whose first `committedSteps` steps are kept. `seam-probe`: a window solved only to choose the state ' +
      'where a parallel segment of the rolling horizon starts; it keeps no steps.',
  }),
  fromStep: count,
  toStep: count.meta({ description: 'Last step of the window (inclusive).' }),
  committedSteps: count,
  outcome: solveOutcomeSchema,
  gap: z.number().nullable(),
  blocks: count.meta({ description: 'Independent parts the model was solved in (reduction independentBlocks).' }),
  solveSeconds: z.number().meta({ description: 'Solver time, blocks summed; time waiting for a free solver thread is not counted.' }),
});
export type WindowReport = z.infer<typeof windowReportSchema>;

const coefficientSpan = z
  .tuple([z.number(), z.number()])
  .nullable()
  .meta({ description: '[smallest, largest] absolute non-zero value; null when the model has no such coefficient.' })
  .register(runComponents, { id: 'CoefficientSpan' });
export type CoefficientSpan = z.infer<typeof coefficientSpan>;

const modelReportSchema = z
  .object({
    mode: z.enum(['monolithic', 'rolling']),
    windows: z.array(windowReportSchema),
    variables: count,
    binaries: count,
    binariesPruned: count,
    constraints: count,
    nonzeros: count,
    coefficientRange: z
      .object({ matrix: coefficientSpan, objective: coefficientSpan, bounds: coefficientSpan, rhs: coefficientSpan })
      .meta({ description: '[smallest, largest] absolute non-zero value of each family, or null.' }),
    bigM: z
      .array(z.object({ where: z.string(), value: z.number() }))
      .meta({ description: 'Every big-M in kW (unscaled); one entry per place, the largest value over steps.' }),
    reductions: reductionsSchema.meta({ description: 'The formulation techniques the spec left switched on.' }),
    segments: count.meta({ description: 'Sequences of rolling windows solved side by side (1: one sequence, or monolithic).' }),
    scale: z
      .object({ powerKw: z.number(), money: z.number(), stores: z.record(z.string(), z.number()), demandPeakKw: z.number() })
      .meta({
        description:
          'The internal units chosen by `scaling` (1 when off): power, money, each store in its own unit, and demand-charge ' +
          'peaks (a power of ten below the power unit, so a kW of peak and a kWh of energy have prices of similar size).',
      }),
    buildSeconds: z.number(),
    solveSeconds: z
      .number()
      .meta({ description: 'Solver time summed over windows and blocks; parallel parts overlap, so it can exceed the elapsed time.' }),
    horizonBound: z
      .object({
        blocks: count.meta({ description: 'Blocks of the horizon, each solved as one LP with its links to the others relaxed and priced.' }),
        solveSeconds: z.number().meta({ description: 'Solver time summed over the blocks.' }),
        bound: z.number().nullable().meta({ description: 'The proven bound, as in `objective.bound`.' }),
        gap: z.number().nullable().meta({ description: 'The proven gap, as in `objective.gap`.' }),
        reason: z.string().nullable().meta({ description: 'Why `objective.bound` is null (the time limit ran out, a block not solved); null when it is known.' }),
      })
      .nullable()
      .meta({ description: 'How a rolling solve’s `objective.bound` was proven; null for a single model, which has its solver’s bound.' }),
    solver: z.object({ name: z.string(), version: z.string() }),
  })
  .meta({
    description:
      'The formulation report. Counts are summed over every window solved (seam probes included); coefficient ranges are ' +
      'after scaling, across all windows; big-M values in kW, the largest per place.',
  })
  .register(runComponents, { id: 'ModelReport' });
export type ModelReport = z.infer<typeof modelReportSchema>;

const stepRangeSchema = z.object({ from: count, to: count.meta({ description: 'Inclusive.' }) });
export type StepRange = z.infer<typeof stepRangeSchema>;

const resultWarningSchema = z
  .object({
    code: z.string(),
    message: z.string(),
    pointer: z.string().optional().meta({ description: 'RFC 6901 pointer into the spec.' }),
    steps: z.array(stepRangeSchema).optional(),
  })
  .register(runComponents, { id: 'ResultWarning' });
export type ResultWarning = z.infer<typeof resultWarningSchema>;

const resultFields = {
  objective: objectiveSchema,
  kpis: kpisSchema.nullable().meta({ description: 'null when there is no schedule (infeasible, no-solution).' }),
  schedule: scheduleSchema.nullable(),
  model: modelReportSchema,
  warnings: z.array(resultWarningSchema),
};

export const runResultSchema = z.object({ status: runStatusSchema, outcome: solveOutcomeSchema, ...resultFields });
export type RunResult = z.infer<typeof runResultSchema>;

const timestamp = z.iso.datetime();

/** Why a run ended without a schedule, or failed with one (infeasible, no-solution). */
const runErrorSchema = z.object({
  code: z.enum(['infeasible', 'no-solution', 'time-limit', 'solver-error', 'invalid-spec', 'cancelled', 'worker-lost']),
  message: z.string(),
});
export type RunError = z.infer<typeof runErrorSchema>;

const runRevisionSchema = z
  .object({
    parentId: z.uuid().meta({ description: 'The run this one re-plans.' }),
    rootId: z.uuid().meta({ description: 'The first run of the chain of revisions.' }),
    fromStep: count.meta({ description: "The step of the parent's horizon this run starts at (the re-plan time)." }),
    rootStep: count.meta({ description: "The same step counted in the first run's horizon." }),
  })
  .nullable()
  .meta({
    description:
      'Set on a re-plan (`POST /v1/runs/{runId}/replans`): its place in the chain of revisions. Its schedule covers the ' +
      "steps from the re-plan time on; the steps before it stay the parent's. null for a run submitted on its own.",
  });

const runStudyPlaceSchema = z
  .object({
    id: z.uuid(),
    position: count.meta({ description: "The run's combination in the study's grid, counted from 0 (the last change varies fastest)." }),
  })
  .nullable()
  .meta({ description: 'Set on a run a study created (`POST /v1/studies`); null otherwise.' });

/** A run over HTTP; lists leave out the result fields. */
export const runSchema = z
  .object({
    id: z.uuid(),
    name: z.string().nullable(),
    status: runStatusSchema,
    outcome: solveOutcomeSchema.nullable(),
    createdAt: timestamp,
    queuedAt: timestamp,
    startedAt: timestamp.nullable(),
    finishedAt: timestamp.nullable(),
    cancelRequestedAt: timestamp.nullable(),
    steps: count,
    units: count,
    progress: z.object({ windowsDone: count, windowsTotal: count.nullable(), percent: z.number() }),
    attempts: count.meta({ description: 'How many times a worker has taken the run (more than 1 only after a worker crashed).' }),
    solverSeconds: z.number().nullable(),
    error: runErrorSchema.nullable(),
    revision: runRevisionSchema,
    study: runStudyPlaceSchema,
    links: z.object({
      self: z.string(),
      spec: z.string(),
      schedule: z.string(),
      cancel: z.string(),
      deliveries: z.string(),
      replans: z.string(),
      revisions: z.string(),
    }),
    ...z.object(resultFields).partial().shape,
  })
  .meta({
    description:
      'A run. `status` is the state machine (queued → running → succeeded | failed | cancelled); `outcome` what the solver ' +
      'found (optimal | feasible | infeasible | no-solution). A run that ends infeasible or without a solution is `failed` ' +
      'with its result and diagnosis. Once finished, the result of SPEC §3 (`objective`, `kpis`, `schedule`, `model`, ' +
      '`warnings`) is included at the top level (lists leave it out).',
  })
  .register(runComponents, { id: 'Run' });
export type RunView = z.infer<typeof runSchema>;
