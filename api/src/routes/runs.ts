import type { Request, Router } from 'express';
import type { RunResult, RunStatus } from '@gridwright/shared/run-result';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import type { Run } from '../db/entities/run';
import { strictRouter } from '../lib/strict-router';
import { runActorOf } from './run-actor';
import { cancelRun } from '../runs/cancellation';
import { delimiterNamed } from '../lib/csv-delimiters';
import { optionalInstant } from '../lib/instants';
import { getRun, getRunDetailText, listRunDeliveries, listRuns } from '../runs/reading';
import { forgetRunView } from '../runs/run-view-cache';
import { getRunSchedule, scheduleCsvFor, type ScheduleCsvChoices } from '../runs/schedule-export';
import { submitRun } from '../runs/submission';
import { runSummary } from '../runs/view';
import { parseIdempotencyKey } from '../services/idempotency';
import { deliveryView } from '../services/webhooks';

/** A list shows each finished run's objective, so runs compare at a glance without their schedules. */
const listItem = (run: Run) => ({ ...runSummary(run), ...(run.result ? { objective: (run.result as RunResult).objective } : {}) });

function queryString(q: Record<string, unknown>) {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  return params.toString();
}

function csvChoices(req: Request): ScheduleCsvChoices {
  const q = req.query as Record<string, string | undefined>;
  return {
    profile: q.profile,
    powerUnit: q.powerUnit as ScheduleCsvChoices['powerUnit'],
    timestamps: q.timestamps as ScheduleCsvChoices['timestamps'],
    delimiter: q.delimiter ? delimiterNamed(q.delimiter) : undefined,
  };
}

export function runsRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.post('/v1/runs', auth, authorize('runs.create'), async (req, res) => {
    const key = parseIdempotencyKey(req.get('idempotency-key'));
    const { run, replayed } = await submitRun(ctx, runActorOf(req), req.body, key);
    res.status(202).location(`/v1/runs/${run.id}`);
    if (replayed) res.setHeader('Idempotent-Replayed', 'true');
    res.json(runSummary(run));
  });

  r.get('/v1/runs', auth, authorize('runs.read'), async (req, res) => {
    const q = req.query as Record<string, any>;
    const limit = Number(q.limit ?? 50);
    const status = typeof q.status === 'string' ? (q.status.split(',') as RunStatus[]) : undefined;
    const { runs, nextCursor } = await listRuns(ctx, req.principal!.tenantId, {
      limit,
      cursor: q.cursor,
      status,
      createdAfter: optionalInstant(q.createdAfter, '/query/createdAfter'),
      createdBefore: optionalInstant(q.createdBefore, '/query/createdBefore'),
    });
    if (nextCursor) {
      const next = queryString({ limit, status: q.status, createdAfter: q.createdAfter, createdBefore: q.createdBefore, cursor: nextCursor });
      res.setHeader('Link', `</v1/runs?${next}>; rel="next"`);
    }
    res.json({ items: runs.map(listItem), nextCursor });
  });

  r.get('/v1/runs/:runId', auth, authorize('runs.read'), async (req, res) => {
    const view = await getRunDetailText(ctx, req.principal!.tenantId, String(req.params.runId), req.app.get('etag fn'));
    // Set here, Express keeps this ETag instead of hashing the body again, and still answers 304 to a matching If-None-Match.
    if (view.etag) res.setHeader('ETag', view.etag);
    res.type('application/json').send(view.json);
  });

  r.get('/v1/runs/:runId/spec', auth, authorize('runs.read'), async (req, res) => {
    res.json((await getRun(ctx, req.principal!.tenantId, String(req.params.runId))).spec);
  });

  r.get('/v1/runs/:runId/log', auth, authorize('runs.read'), async (req, res) => {
    const run = await getRun(ctx, req.principal!.tenantId, String(req.params.runId));
    res.type('text/plain; charset=utf-8').send(run.solverLog);
  });

  r.get('/v1/runs/:runId/schedule', auth, authorize('runs.read'), async (req, res) => {
    const { run, schedule } = await getRunSchedule(ctx, req.principal!.tenantId, String(req.params.runId));
    const wantsCsv = req.query.format === 'csv' || (req.query.format === undefined && req.accepts(['application/json', 'text/csv']) === 'text/csv');
    if (!wantsCsv) return res.json(schedule);
    const csv = await scheduleCsvFor(ctx, req.principal!.tenantId, schedule, csvChoices(req));
    res
      .type('text/csv; charset=utf-8; header=present')
      .setHeader('Content-Disposition', `attachment; filename="run-${run.id}-schedule.csv"`)
      .send(csv);
  });

  r.post('/v1/runs/:runId/cancel', auth, authorize('runs.cancel'), async (req, res) => {
    const run = await cancelRun(ctx, req.principal!.tenantId, String(req.params.runId));
    // The change notice reaches this process too, but a client's next poll may come first.
    forgetRunView(ctx, run.tenantId, run.id);
    res.status(202).json(runSummary(run));
  });

  r.get('/v1/runs/:runId/webhook-deliveries', auth, authorize('webhooks.read'), async (req, res) => {
    res.json({ items: (await listRunDeliveries(ctx, req.principal!.tenantId, String(req.params.runId))).map(deliveryView) });
  });

  return r;
}
