import { Router, type Request } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import type { RunStatus } from '../db/entities/run';
import { HttpProblem } from '../lib/problem';
import { getExportProfile } from '../services/export-profiles';
import { parseIdempotencyKey } from '../services/idempotency';
import { cancelRun, getRun, listRuns, submitRun } from '../services/runs';
import { runDetail, runSummary } from '../services/run-view';
import { scheduleToCsv, type ScheduleCsvOptions } from '../services/schedule-csv';
import { deliveryView, listDeliveries } from '../services/webhooks';
import type { Schedule } from '@gridwright/shared/run-result';

const DELIMITERS: Record<string, string> = { ',': ',', ';': ';', tab: '\t', '|': '|' };

const actorOf = (req: Request) => {
  const p = req.principal!;
  return { tenantId: p.tenantId, userId: p.userId, apiKeyId: p.apiKeyId };
};

function queryString(q: Record<string, unknown>) {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== null && v !== '') params.set(k, String(v));
  return params.toString();
}

async function csvOptions(ctx: AppContext, req: Request): Promise<ScheduleCsvOptions> {
  const q = req.query as Record<string, string | undefined>;
  const profile = q.profile ? await getExportProfile(ctx, req.principal!.tenantId, q.profile) : null;
  return {
    powerUnit: (q.powerUnit as 'kW' | 'MW' | undefined) ?? profile?.powerUnit ?? 'kW',
    timestamps: (q.timestamps as 'utc' | 'offset' | undefined) ?? profile?.timestamps ?? 'utc',
    delimiter: q.delimiter ? DELIMITERS[q.delimiter] : (profile?.delimiter ?? ','),
    tagMap: profile?.tagMap ?? {},
  };
}

export function runsRouter(ctx: AppContext): Router {
  const r = Router();
  const auth = authenticate(ctx);

  r.post('/v1/runs', auth, authorize('runs.create'), async (req, res) => {
    const key = parseIdempotencyKey(req.get('idempotency-key'));
    const { run, replayed } = await submitRun(ctx, actorOf(req), req.body, key);
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
      createdAfter: q.createdAfter,
      createdBefore: q.createdBefore,
    });
    if (nextCursor) {
      const next = queryString({ limit, status: q.status, createdAfter: q.createdAfter, createdBefore: q.createdBefore, cursor: nextCursor });
      res.setHeader('Link', `</v1/runs?${next}>; rel="next"`);
    }
    res.json({ items: runs.map(runSummary), nextCursor });
  });

  r.get('/v1/runs/:runId', auth, authorize('runs.read'), async (req, res) => {
    res.json(runDetail(await getRun(ctx, req.principal!.tenantId, String(req.params.runId))));
  });

  r.get('/v1/runs/:runId/spec', auth, authorize('runs.read'), async (req, res) => {
    res.json((await getRun(ctx, req.principal!.tenantId, String(req.params.runId))).spec);
  });

  r.get('/v1/runs/:runId/log', auth, authorize('runs.read'), async (req, res) => {
    const run = await getRun(ctx, req.principal!.tenantId, String(req.params.runId));
    res.type('text/plain; charset=utf-8').send(run.solverLog);
  });

  r.get('/v1/runs/:runId/schedule', auth, authorize('runs.read'), async (req, res) => {
    const run = await getRun(ctx, req.principal!.tenantId, String(req.params.runId));
    const schedule = (run.result as { schedule?: Schedule | null } | null)?.schedule;
    if (!schedule) {
      throw new HttpProblem({
        status: 409,
        slug: 'no-schedule',
        title: 'No schedule yet',
        detail: run.result ? `Run ${run.id} ended ${run.outcome ?? run.status} without a schedule.` : `Run ${run.id} is ${run.status}; the schedule exists once it has succeeded.`,
        extensions: { runStatus: run.status, outcome: run.outcome },
      });
    }
    const wantsCsv = req.query.format === 'csv' || (req.query.format === undefined && req.accepts(['application/json', 'text/csv']) === 'text/csv');
    if (!wantsCsv) return res.json(schedule);
    const csv = scheduleToCsv(schedule, await csvOptions(ctx, req));
    res
      .type('text/csv; charset=utf-8; header=present')
      .setHeader('Content-Disposition', `attachment; filename="run-${run.id}-schedule.csv"`)
      .send(csv);
  });

  r.post('/v1/runs/:runId/cancel', auth, authorize('runs.cancel'), async (req, res) => {
    const run = await cancelRun(ctx, req.principal!.tenantId, String(req.params.runId));
    res.status(202).json(runSummary(run));
  });

  r.get('/v1/runs/:runId/webhook-deliveries', auth, authorize('webhooks.read'), async (req, res) => {
    const run = await getRun(ctx, req.principal!.tenantId, String(req.params.runId));
    const deliveries = await listDeliveries(ctx, { tenantId: run.tenantId, runId: run.id });
    res.json({ items: deliveries.map(deliveryView) });
  });

  return r;
}
