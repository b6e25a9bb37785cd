import type { RunResult, RunView } from '@gridwright/shared/run-result';
import type { Run } from '../db/entities/run';

/** What a run is shown as: every column but the spec, the solver log and the bookkeeping of who and where. */
export type RunForView = Omit<Run, 'spec' | 'seriesId' | 'timeLimitSeconds' | 'createdByUserId' | 'createdByApiKeyId' | 'workerId' | 'solverLog'>;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function runLinks(id: string) {
  return {
    self: `/v1/runs/${id}`,
    spec: `/v1/runs/${id}/spec`,
    schedule: `/v1/runs/${id}/schedule`,
    cancel: `/v1/runs/${id}/cancel`,
    deliveries: `/v1/runs/${id}/webhook-deliveries`,
  };
}

/** The run without its result: what lists show. */
export function runSummary(run: RunForView): RunView {
  const total = run.windowsTotal;
  return {
    id: run.id,
    name: run.name,
    status: run.status,
    outcome: run.outcome,
    createdAt: run.createdAt.toISOString(),
    queuedAt: run.createdAt.toISOString(),
    startedAt: iso(run.startedAt),
    finishedAt: iso(run.finishedAt),
    cancelRequestedAt: iso(run.cancelRequestedAt),
    steps: run.steps,
    units: run.units,
    progress: {
      windowsDone: run.windowsDone,
      windowsTotal: total,
      percent: run.status === 'succeeded' ? 100 : total ? Math.round((1000 * run.windowsDone) / total) / 10 : 0,
    },
    attempts: run.attempts,
    solverSeconds: run.solverSeconds,
    error: run.error,
    links: runLinks(run.id),
  };
}

/** The run with, once it has one, the result of SPEC.md §3 at the top level. */
export function runDetail(run: RunForView): RunView {
  const result = run.result as RunResult | null;
  return {
    ...runSummary(run),
    ...(result
      ? { objective: result.objective, kpis: result.kpis, schedule: result.schedule, model: result.model, warnings: result.warnings }
      : {}),
  };
}
