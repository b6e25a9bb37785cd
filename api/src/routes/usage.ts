import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { usageReport } from '../services/usage';

export function usageRouter(ctx: AppContext): Router {
  const r = strictRouter();
  r.get('/v1/usage', authenticate(ctx), authorize('usage.read'), async (req, res) => {
    res.json(await usageReport(ctx, req.principal!.tenantId));
  });
  return r;
}
