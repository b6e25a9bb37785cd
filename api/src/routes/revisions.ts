import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { runActorOf } from './run-actor';
import { plannedStateView } from '../runs/planned-state-view';
import { replanRun } from '../runs/replanning';
import { revisionDiff } from '../runs/revision-diff';
import { listRevisions } from '../runs/revisions';
import { runSummary } from '../runs/view';
import { parseIdempotencyKey } from '../services/idempotency';

/** Re-plans of a run from measured state, and the chain of revisions they make. */
export function revisionsRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.post('/v1/runs/:runId/replans', auth, authorize('runs.create'), async (req, res) => {
    const key = parseIdempotencyKey(req.get('idempotency-key'));
    const { run, replayed } = await replanRun(ctx, runActorOf(req), String(req.params.runId), req.body, key);
    res.status(202).location(`/v1/runs/${run.id}`);
    if (replayed) res.setHeader('Idempotent-Replayed', 'true');
    res.json(runSummary(run));
  });

  r.get('/v1/runs/:runId/planned-state', auth, authorize('runs.read'), async (req, res) => {
    res.json(await plannedStateView(ctx, req.principal!.tenantId, String(req.params.runId), req.query.at as string | undefined));
  });

  r.get('/v1/runs/:runId/revisions', auth, authorize('runs.read'), async (req, res) => {
    res.json(await listRevisions(ctx, req.principal!.tenantId, String(req.params.runId)));
  });

  r.get('/v1/runs/:runId/revision-diff', auth, authorize('runs.read'), async (req, res) => {
    res.json(await revisionDiff(ctx, req.principal!.tenantId, String(req.params.runId), req.query.base as string | undefined));
  });

  return r;
}
