import type { RevisionDiff } from '@gridwright/shared/revisions';
import type { ObjectiveTerms, Schedule } from '@gridwright/shared/run-result';
import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';
import type { AppContext } from '../context';
import type { Run } from '../db/entities/run';
import { demandChargeSteps } from '../engine/demand-charge-steps';
import { objectiveTerms, sumTerms } from '../engine/evaluate-objective';
import { createScheduleBuffers } from '../engine/schedule-buffers';
import { HttpProblem, validationProblem } from '../lib/problem';
import { resolveSiteSpecForTenant } from '../services/resolve-site-spec';
import { scheduleColumns } from '../services/schedule-csv';
import { getRunSchedule } from './schedule-export';

/** Differences smaller than this are float noise, not a changed setpoint. */
const CHANGED = 1e-6;

/** The unit of each kind of setpoint column; marginal values (`pricePerEnergy`, a store's `.marginalValue`) are prices, not setpoints, and are left out. */
const UNIT_OF = { power: 'kW', energy: 'kWh', flag: 'on/off', store: 'store unit' } as const;
const isSetpoint = (column: { key: string; kind: string }): column is { key: string; kind: keyof typeof UNIT_OF } =>
  column.kind in UNIT_OF && !column.key.endsWith('.marginalValue');
const numeric = (values: (number | null)[]): values is number[] => values.every((v) => v !== null);

/** Every per-step array of a schedule from step `from` on (every array in a schedule is per step). */
function scheduleFrom<T>(value: T, from: number): T {
  if (Array.isArray(value)) return value.slice(from) as T;
  if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, scheduleFrom(v, from)])) as T;
  return value;
}

/** The SPEC §2/§5 objective of `schedule`, term by term, priced by `spec` (the engine's own evaluation). */
export function valueSchedule(spec: ResolvedSiteSpec, schedule: Schedule): ObjectiveTerms {
  const b = createScheduleBuffers(spec);
  b.supplyUsed.set(schedule.supplyUsedKw);
  b.unserved.set(schedule.unservedKw);
  b.imp.set(schedule.grid.importKw);
  b.exp.set(schedule.grid.exportKw);
  spec.units.forEach((u, i) => {
    b.units[i].on.set(schedule.units[u.id].on);
    b.units[i].power.set(schedule.units[u.id].powerKw);
  });
  spec.storage.forEach((s, i) => {
    b.storage[i].charge.set(schedule.storage[s.id].chargeKw);
    b.storage[i].discharge.set(schedule.storage[s.id].dischargeKw);
    b.storage[i].soc.set(schedule.storage[s.id].socKwh);
  });
  spec.stores.forEach((s, j) => {
    b.stores[j].level.set(schedule.stores[s.id].level);
    b.stores[j].shortfall.set(schedule.stores[s.id].shortfall);
    b.stores[j].spill.set(schedule.stores[s.id].spill);
  });
  return objectiveTerms(spec, demandChargeSteps(spec), b);
}

const rootOf = (run: Run) => run.rootRunId ?? run.id;

function termsChange(after: ObjectiveTerms, before: ObjectiveTerms): ObjectiveTerms {
  return Object.fromEntries(Object.keys(after).map((k) => [k, after[k as keyof ObjectiveTerms] - before[k as keyof ObjectiveTerms]])) as ObjectiveTerms;
}

/**
 * What changed between two revisions of one chain (by default, a re-plan and its parent), over the steps both cover (from the later
 * start to the common end): every setpoint column of the schedule export step by step, and the
 * objective terms of both schedules priced by the later revision's spec — its measured initial
 * state, fresh prices and peaks so far — so the two are valued alike.
 */
export async function revisionDiff(ctx: AppContext, tenantId: string, id: string, baseId: string | undefined): Promise<RevisionDiff> {
  const revision = await getRunSchedule(ctx, tenantId, id);
  if (baseId === undefined && !revision.run.parentRunId) {
    throw new HttpProblem({
      status: 409,
      slug: 'no-parent',
      title: 'The run re-plans no other run',
      detail: `Run ${id} is the first of its chain: name the revision to compare it with in \`base\`.`,
    });
  }
  const base = await getRunSchedule(ctx, tenantId, baseId ?? revision.run.parentRunId!);
  if (rootOf(revision.run) !== rootOf(base.run)) {
    throw validationProblem([{ pointer: '/query/base', message: `run ${baseId} is not a revision in the chain of run ${id}` }]);
  }
  const later = base.run.rootStep > revision.run.rootStep ? base.run : revision.run;
  const valuation = await resolveSiteSpecForTenant(ctx.db.manager, tenantId, later.spec);
  if (!valuation.ok) {
    throw new HttpProblem({
      status: 409,
      slug: 'revision-spec-unresolvable',
      title: "The later revision's spec no longer resolves",
      detail: `Run ${later.id}'s spec, which prices both schedules, cannot be resolved: ${valuation.errors.map((e) => `${e.pointer} ${e.message}`).join('; ')}`,
    });
  }
  const fromRootStep = later.rootStep;
  const before = scheduleFrom(base.schedule, fromRootStep - base.run.rootStep);
  const after = scheduleFrom(revision.schedule, fromRootStep - revision.run.rootStep);
  const beforeColumns = new Map(scheduleColumns(before).map((c) => [c.key, c.values]));
  const setpoints = scheduleColumns(after).flatMap((column) => {
    const old = beforeColumns.get(column.key);
    const values = column.values;
    if (!old || !isSetpoint(column) || !numeric(old) || !numeric(values)) return [];
    const change = values.map((v, t) => Math.abs(v - old[t]));
    return [
      {
        key: column.key,
        unit: UNIT_OF[column.kind],
        base: old,
        revision: values,
        changedSteps: change.filter((d) => d > CHANGED).length,
        largestChange: change.reduce((m, d) => Math.max(m, d), 0),
      },
    ];
  });
  const baseTerms = valueSchedule(valuation.resolved, before);
  const revisionTerms = valueSchedule(valuation.resolved, after);
  const change = termsChange(revisionTerms, baseTerms);
  return {
    base: { id: base.run.id, rootStep: base.run.rootStep },
    revision: { id: revision.run.id, rootStep: revision.run.rootStep },
    fromRootStep,
    valuedWith: later.id,
    timestamps: after.timestamps,
    setpoints,
    objective: {
      base: { terms: baseTerms, total: sumTerms(baseTerms) },
      revision: { terms: revisionTerms, total: sumTerms(revisionTerms) },
      change: { terms: change, total: sumTerms(change) },
    },
  };
}
