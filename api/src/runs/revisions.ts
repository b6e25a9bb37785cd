import type { RevisionChain } from '@gridwright/shared/revisions';
import type { RunStatus } from '@gridwright/shared/run-result';
import type { AppContext } from '../context';
import { getRun } from './reading';

interface RevisionRow {
  id: string;
  name: string | null;
  status: RunStatus;
  outcome: string | null;
  parent_run_id: string | null;
  replan_from_step: number | null;
  root_step: number;
  steps: number;
  created_at: Date;
  starts_at: string;
  step_minutes: number;
  objective: number | null;
}

/**
 * The chain a run belongs to: its first run and every re-plan made from it or from one of its
 * re-plans (a run may be re-planned more than once from the same step, so the chain can branch),
 * by the step they start at in the first run's horizon, then by creation.
 */
export async function listRevisions(ctx: AppContext, tenantId: string, id: string): Promise<RevisionChain> {
  const run = await getRun(ctx, tenantId, id);
  const rootId = run.rootRunId ?? run.id;
  const rows: RevisionRow[] = await ctx.db.query(
    `SELECT id, name, status, outcome, parent_run_id, replan_from_step, root_step, steps, created_at,
            spec->'horizon'->>'start' AS starts_at, (spec->'horizon'->>'stepMinutes')::int AS step_minutes,
            (result->'objective'->>'value')::float8 AS objective
       FROM runs
      WHERE tenant_id = $1 AND (id = $2 OR root_run_id = $2)
      ORDER BY root_step, created_at, id`,
    [tenantId, rootId],
  );
  return {
    rootId,
    stepMinutes: rows[0].step_minutes,
    items: rows.map((r) => ({
      id: r.id,
      name: r.name,
      status: r.status,
      outcome: r.outcome,
      parentId: r.parent_run_id,
      fromStep: r.replan_from_step,
      rootStep: r.root_step,
      startsAt: r.starts_at,
      steps: r.steps,
      createdAt: r.created_at.toISOString(),
      objective: r.objective,
      links: { self: `/v1/runs/${r.id}` },
    })),
  };
}
