import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { checkSpec } from '../runs/submission';

export function specsRouter(ctx: AppContext): Router {
  const r = strictRouter();

  r.post('/v1/specs/validate', authenticate(ctx), authorize('runs.create'), async (req, res) => {
    res.json(await checkSpec(ctx, req.principal!.tenantId, req.body));
  });

  return r;
}
