import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import { billingStanding } from '../billing/billing-view';
import { endPlanGrant, grantPlan } from '../billing/plan-grants';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { auditActorOf } from '../services/audit';

export function adminBillingRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);
  const operate = authorize('tenants.operate');

  r.get('/v1/admin/tenants/:id/billing', auth, operate, async (req, res) => {
    res.json(await billingStanding(ctx, req.params.id as string));
  });

  r.put('/v1/admin/tenants/:id/plan-grant', auth, operate, async (req, res) => {
    await grantPlan(ctx, req.params.id as string, { planId: req.body.planId, reason: req.body.reason }, await auditActorOf(ctx, req.principal));
    res.json(await billingStanding(ctx, req.params.id as string));
  });

  r.delete('/v1/admin/tenants/:id/plan-grant', auth, operate, async (req, res) => {
    await endPlanGrant(ctx, req.params.id as string, await auditActorOf(ctx, req.principal));
    res.json(await billingStanding(ctx, req.params.id as string));
  });

  return r;
}
