/**
 * Re-plans from measured state and the chain of revisions they make: the request of
 * `POST /v1/runs/{runId}/replans`, the chain and the difference between two revisions. zod schemas,
 * the types inferred from them, and (`npm run gen:openapi`) the component schemas of
 * `openapi/openapi.yaml`. Isomorphic — no node imports.
 */
import { z } from 'zod';
import { objectiveTermsSchema, runStatusSchema } from './run-result';
import { MAX_STEPS } from './site-spec';

/** Request bodies (generated with `io: 'input'`). */
export const revisionRequestComponents = z.registry<{ id: string }>();
/** Responses (generated with `io: 'output'`). */
export const revisionComponents = z.registry<{ id: string }>();

const count = z.number().int().min(0);
const assetKey = z.string().min(1).max(64);
const kwPerStep = z.array(z.number().min(0)).min(1).max(MAX_STEPS);
const kwOrPerStep = z.union([z.number().min(0), kwPerStep]);
const pricePerStep = z.union([z.number(), z.array(z.number()).min(1).max(MAX_STEPS)]);

const replanFrom = z
  .union(
    [
      z.number().int().min(0).max(MAX_STEPS),
      z.iso.datetime({ offset: true, error: 'must be a step index, or an ISO 8601 date-time with a UTC offset at a step boundary' }),
    ],
    { error: 'must be a step index (a whole number), or an ISO 8601 date-time with a UTC offset at a step boundary' },
  )
  .meta({
    description:
      "Where the re-plan starts: a step index of the parent's horizon, or the instant a step starts (any offset). From " +
      "0 to the parent's last step; other instants are refused with a 400 naming this field.",
    examples: [12, '2027-03-01T12:00:00+01:00'],
  });

const measuredUnitSchema = z
  .strictObject({
    on: z.boolean().optional().meta({ description: 'Absent: as planned for the step before `from`.' }),
    stepsInState: count
      .optional()
      .meta({ description: 'Steps the unit has been in that state. Absent: counted from the plan; required when `on` differs from it.' }),
    powerKw: z
      .number()
      .min(0)
      .optional()
      .meta({ description: 'Output now (the ramp limits apply from it). Absent: as planned when the plan has the unit on too, else no ramp limit at the first step.' }),
  })
  .register(revisionRequestComponents, { id: 'MeasuredUnitState' });

const measuredStateSchema = z
  .strictObject({
    storage: z
      .record(assetKey, z.strictObject({ socKwh: z.number().min(0) }))
      .default({})
      .meta({ description: "By battery id: the state of charge now. Becomes the re-plan's `initialSocKwh`." }),
    stores: z
      .record(assetKey, z.strictObject({ level: z.number().min(0) }))
      .default({})
      .meta({ description: "By store id: the level now, in the store's unit. Becomes the store's `initial`." }),
    units: z
      .record(assetKey, measuredUnitSchema)
      .default({})
      .meta({ description: "By unit id: on/off, time in that state and output now. Become the unit's `initial`." }),
    demandCharges: z
      .record(assetKey, z.strictObject({ peakKw: z.number().min(0) }))
      .default({})
      .meta({ description: "By demand-charge id: the peak reached so far this billing period. Becomes its `existingPeakKw`." }),
  })
  .meta({
    description:
      'What was measured at the re-plan time. Anything left out is taken from the plan: the value the parent schedules for ' +
      'the end of the step before `from` (its initial state when `from` is 0), and for a demand charge the larger of its ' +
      '`existingPeakKw` and the planned import in its window before `from`.',
  })
  .register(revisionRequestComponents, { id: 'MeasuredState' });

const freshSeriesSchema = z
  .strictObject({
    supplyKw: kwPerStep.optional().meta({ description: 'Available supply per remaining step.' }),
    siteLoadKw: kwPerStep.optional().meta({ description: 'Site load per remaining step (a hard load when the parent had none).' }),
    importPrice: pricePerStep.optional(),
    exportPrice: pricePerStep.optional(),
    storeDemandPerHour: z.record(assetKey, kwOrPerStep).optional().meta({ description: 'By store id: its demand per hour.' }),
    reserveUpKw: kwOrPerStep.optional().meta({ description: 'Spinning reserve to hold (the parent must have a reserve requirement).' }),
  })
  .meta({
    description:
      "Fresh forecasts for the remaining steps, each one value per step from `from` to the horizon's end (or one figure " +
      "where the spec allows one). Anything left out keeps the parent's values for those steps.",
  })
  .register(revisionRequestComponents, { id: 'FreshSeries' });

export const replanRequestSchema = z
  .strictObject({
    from: replanFrom,
    state: measuredStateSchema.prefault({}),
    series: freshSeriesSchema.prefault({}),
    name: z.string().max(200).optional().meta({ description: "Default: the parent's name and the re-plan time." }),
  })
  .meta({
    description:
      "A re-plan of a run that has a schedule: the parent's spec from `from` to the end of its horizon, starting from the " +
      'measured state, with fresh series where given. The new run is validated and queued like any run.',
  })
  .register(revisionRequestComponents, { id: 'ReplanRequest' });
export type ReplanRequest = z.output<typeof replanRequestSchema>;
export type MeasuredState = ReplanRequest['state'];
export type FreshSeries = ReplanRequest['series'];

export const plannedStateSchema = z
  .object({
    from: count.meta({ description: "The step of the run's horizon the state is at the start of." }),
    startsAt: z.iso.datetime({ offset: true }),
    state: z.object({
      storage: z.record(z.string(), z.object({ socKwh: z.number() })),
      stores: z.record(z.string(), z.object({ level: z.number() })),
      units: z.record(z.string(), z.object({ on: z.boolean(), stepsInState: count, powerKw: z.number().nullable().meta({ description: 'null when off.' }) })),
      demandCharges: z.record(z.string(), z.object({ peakKw: z.number() })),
    }),
  })
  .meta({
    description:
      'The state the schedule leaves at the start of a step, in the shape of a re-plan\'s `state`: what a re-plan from that ' +
      'step assumes for anything it is not told.',
  })
  .register(revisionComponents, { id: 'PlannedState' });
export type PlannedState = z.infer<typeof plannedStateSchema>;

const revisionEntrySchema = z
  .object({
    id: z.uuid(),
    name: z.string().nullable(),
    status: runStatusSchema,
    outcome: z.string().nullable(),
    parentId: z.uuid().nullable().meta({ description: 'null for the first run of the chain.' }),
    fromStep: count.nullable().meta({ description: "The step of the parent's horizon the revision starts at." }),
    rootStep: count.meta({ description: "The step of the first run's horizon the revision starts at." }),
    startsAt: z.iso.datetime({ offset: true }),
    steps: count,
    createdAt: z.iso.datetime(),
    objective: z.number().nullable().meta({ description: "The revision's own objective: over its steps, from its own initial state." }),
    links: z.object({ self: z.string() }),
  })
  .register(revisionComponents, { id: 'Revision' });
export type Revision = z.infer<typeof revisionEntrySchema>;

export const revisionChainSchema = z
  .object({
    rootId: z.uuid(),
    stepMinutes: count,
    items: z.array(revisionEntrySchema).meta({ description: 'The first run and every re-plan made from it or from one of its re-plans, by start step, then by creation.' }),
  })
  .register(revisionComponents, { id: 'RevisionChain' });
export type RevisionChain = z.infer<typeof revisionChainSchema>;

const valuedTermsSchema = z.object({ terms: objectiveTermsSchema, total: z.number() });

const setpointChangeSchema = z.object({
  key: z.string().meta({ description: 'The CSV export\'s column name, e.g. `ely-1.powerKw` or `grid.importKw`; marginal values (prices, not setpoints) are left out.' }),
  unit: z.enum(['kW', 'kWh', 'on/off', 'store unit']).meta({ description: "`store unit`: a store's level, shortfall or spill, in the store's own unit." }),
  base: z.array(z.number()),
  revision: z.array(z.number()),
  changedSteps: count.meta({ description: 'Steps where the two differ by more than 1e-6.' }),
  largestChange: z.number().meta({ description: 'The largest absolute difference over the steps.' }),
});

export const revisionDiffSchema = z
  .object({
    base: z.object({ id: z.uuid(), rootStep: count }),
    revision: z.object({ id: z.uuid(), rootStep: count }),
    fromRootStep: count.meta({ description: 'The first step both cover, in the first run\'s horizon: the later start of the two.' }),
    valuedWith: z.uuid().meta({
      description:
        'The revision whose spec values both schedules (the one that starts later; on a tie, `revision`): its initial state, ' +
        'prices and peaks so far, so the two are priced alike over the same steps.',
    }),
    timestamps: z.array(z.iso.datetime({ offset: true })),
    setpoints: z.array(setpointChangeSchema).meta({ description: 'Every column of the schedule export, step by step over the common steps (revision − base).' }),
    objective: z
      .object({ base: valuedTermsSchema, revision: valuedTermsSchema, change: valuedTermsSchema })
      .meta({ description: 'The objective terms of each schedule over the common steps, and revision − base.' }),
  })
  .register(revisionComponents, { id: 'RevisionDiff' });
export type RevisionDiff = z.infer<typeof revisionDiffSchema>;
