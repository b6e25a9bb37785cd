import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import { changePlan } from '../billing/plan-changes';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { auditActorOf } from '../services/audit';
import { getTenantOr404, listPlans, planView, tenantView } from '../services/tenants';

export function tenantRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.get('/v1/plans', auth, authorize('tenant.read'), async (_req, res) => {
    res.json({ items: (await listPlans(ctx)).map(planView) });
  });

  r.get('/v1/tenant', auth, authorize('tenant.read'), async (req, res) => {
    res.json(await tenantView(ctx.db.manager, await getTenantOr404(ctx.db.manager, req.principal!.tenantId)));
  });

  r.put('/v1/tenant/plan', auth, authorize('plan.manage'), async (req, res) => {
    const tenantId = req.principal!.tenantId;
    await changePlan(ctx, { tenantId, planId: req.body.planId, role: req.principal!.role }, await auditActorOf(ctx, req.principal));
    res.json(await tenantView(ctx.db.manager, await getTenantOr404(ctx.db.manager, tenantId)));
  });

  return r;
}
