/**
 * Studies: one base spec, a small grid of changes, one run per combination, and the comparison of
 * their results. zod schemas, the types inferred from them, and (`npm run gen:openapi`) the
 * component schemas of `openapi/openapi.yaml`. Isomorphic — no node imports.
 */
import { z } from 'zod';
import { isPointer } from './json-pointer';
import { objectiveTermsSchema, runStatusSchema } from './run-result';
import { siteSpecSchema } from './site-spec';

/** Request bodies (generated with `io: 'input'`). */
export const studyRequestComponents = z.registry<{ id: string }>();
/** Responses (generated with `io: 'output'`). */
export const studyComponents = z.registry<{ id: string }>();

/** The most changes a study's grid may have. */
export const STUDY_MAX_CHANGES = 4;
/** The most values one change may list. */
export const STUDY_MAX_VALUES = 16;
/** The most combinations (runs) one study may create; the plan may allow fewer (its runs queued or running at once). */
export const STUDY_MAX_RUNS = 64;

const count = z.number().int().min(0);

const studyChangeSchema = z
  .strictObject({
    pointer: z
      .string()
      .min(2)
      .max(500)
      .refine(isPointer, 'must be an RFC 6901 JSON Pointer such as "/storage/0/capacityKwh"')
      .meta({ description: 'RFC 6901 JSON Pointer to a field that exists in the base spec.' }),
    label: z.string().min(1).max(64).optional().meta({ description: 'A short name for tables and charts; default: the pointer.' }),
    values: z
      .array(z.unknown())
      .min(1)
      .max(STUDY_MAX_VALUES)
      .meta({ description: `1–${STUDY_MAX_VALUES} JSON values put at the pointer in turn (a number, a price array, a whole battery…).` }),
  })
  .register(studyRequestComponents, { id: 'StudyChange' });
export type StudyChange = z.output<typeof studyChangeSchema>;

export const studyRequestSchema = z
  .strictObject({
    name: z.string().min(1).max(200).optional(),
    baseSpec: siteSpecSchema,
    changes: z
      .array(studyChangeSchema)
      .min(1)
      .max(STUDY_MAX_CHANGES)
      .meta({
        description:
          `1–${STUDY_MAX_CHANGES} changes; the study runs every combination of their values (the product of the lists, at most ` +
          `${STUDY_MAX_RUNS}, and at most the runs the plan lets the tenant have queued or running at once).`,
      }),
  })
  .meta({
    description:
      'A base spec and a grid of changes. Every combination is applied to the base spec and validated before anything is ' +
      'created; then one transaction creates the study and one queued run per combination.',
  })
  .register(studyRequestComponents, { id: 'StudyRequest' });
export type StudyRequest = z.input<typeof studyRequestSchema>;

const studyStatusSchema = z
  .enum(['running', 'finished', 'cancelled'])
  .meta({ description: '`running` while any of its runs is queued or running; then `cancelled` if it was cancelled, else `finished`.' })
  .register(studyComponents, { id: 'StudyStatus' });
export type StudyStatus = z.infer<typeof studyStatusSchema>;

const changeViewSchema = z.object({ pointer: z.string(), label: z.string(), values: z.array(z.unknown()) });

const studyProgressSchema = z.object({
  runsTotal: count,
  runsDone: count.meta({ description: 'Runs that have ended: succeeded, failed or cancelled.' }),
  succeeded: count,
  failed: count,
  cancelled: count,
  running: count,
  queued: count,
  percent: z.number().meta({ description: "The runs' progress averaged: an ended run counts 100, a running one its windows done." }),
});

const studyRunSchema = z.object({
  position: count,
  values: z.array(z.unknown()).meta({ description: 'The value of each change in this combination, in the order of `changes`.' }),
  runId: z.uuid(),
  name: z.string().nullable(),
  status: runStatusSchema,
  outcome: z.string().nullable(),
  progress: z.object({ windowsDone: count, windowsTotal: count.nullable(), percent: z.number() }),
  startedAt: z.iso.datetime().nullable(),
  finishedAt: z.iso.datetime().nullable(),
});

export const studySchema = z
  .object({
    id: z.uuid(),
    name: z.string().nullable(),
    status: studyStatusSchema,
    createdAt: z.iso.datetime(),
    cancelRequestedAt: z.iso.datetime().nullable(),
    changes: z.array(changeViewSchema),
    progress: studyProgressSchema,
    runs: z.array(studyRunSchema).optional().meta({ description: 'Each combination and its run (not in lists).' }),
    links: z.object({ self: z.string(), comparison: z.string(), cancel: z.string() }),
  })
  .register(studyComponents, { id: 'Study' });
export type StudyView = z.infer<typeof studySchema>;

const comparisonRowSchema = z.object({
  position: count,
  values: z.array(z.unknown()),
  runId: z.uuid(),
  status: runStatusSchema,
  outcome: z.string().nullable(),
  objective: z.number().nullable().meta({ description: 'null until the run has a schedule.' }),
  objectiveTerms: objectiveTermsSchema.nullable(),
  importKwh: z.number().nullable(),
  exportKwh: z.number().nullable(),
  curtailedKwh: z.number().nullable(),
  unservedKwh: z.number().nullable(),
  starts: count.nullable().meta({ description: 'Starts of all units together.' }),
  demandChargePeaks: z.record(z.string(), z.number()).meta({ description: 'By demand-charge id: the peak the schedule sets (kW).' }),
  solverSeconds: z.number().nullable(),
  links: z.object({ run: z.string() }),
});
export type ComparisonRow = z.infer<typeof comparisonRowSchema>;

export const studyComparisonSchema = z
  .object({
    studyId: z.uuid(),
    changes: z.array(changeViewSchema),
    rows: z.array(comparisonRowSchema).meta({ description: 'One per combination, in grid order; figures are null until its run has a schedule.' }),
    best: count.nullable().meta({ description: 'The position with the highest objective among the runs with a schedule.' }),
  })
  .register(studyComponents, { id: 'StudyComparison' });
export type StudyComparison = z.infer<typeof studyComparisonSchema>;
