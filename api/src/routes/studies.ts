import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { cancelStudy } from '../studies/cancellation';
import { compareStudy } from '../studies/comparison';
import { getStudy, listStudies } from '../studies/reading';
import { createStudy } from '../studies/submission';
import { runActorOf } from './run-actor';

/** Studies: a base spec and a grid of changes, one run per combination, and their comparison. */
export function studiesRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.post('/v1/studies', auth, authorize('runs.create'), async (req, res) => {
    const study = await createStudy(ctx, runActorOf(req), req.body);
    res.status(202).location(study.links.self).json(study);
  });

  r.get('/v1/studies', auth, authorize('runs.read'), async (req, res) => {
    const q = req.query as Record<string, any>;
    const limit = Number(q.limit ?? 50);
    const { studies, nextCursor } = await listStudies(ctx, req.principal!.tenantId, { limit, cursor: q.cursor });
    if (nextCursor) res.setHeader('Link', `</v1/studies?${new URLSearchParams({ limit: String(limit), cursor: nextCursor })}>; rel="next"`);
    res.json({ items: studies, nextCursor });
  });

  r.get('/v1/studies/:studyId', auth, authorize('runs.read'), async (req, res) => {
    res.json(await getStudy(ctx, req.principal!.tenantId, String(req.params.studyId)));
  });

  r.get('/v1/studies/:studyId/comparison', auth, authorize('runs.read'), async (req, res) => {
    res.json(await compareStudy(ctx, req.principal!.tenantId, String(req.params.studyId)));
  });

  r.post('/v1/studies/:studyId/cancel', auth, authorize('runs.cancel'), async (req, res) => {
    res.status(202).json(await cancelStudy(ctx, req.principal!.tenantId, String(req.params.studyId)));
  });

  return r;
}
