import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { auditActorOf, auditEventView, listAuditEvents } from '../services/audit';
import { createTenantWithOwner, getTenantOr404, listTenants, setTenantSuspended, tenantView, updateTenant } from '../services/tenants';
import { usageReport } from '../services/usage';

export function adminTenantsRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);
  const operate = authorize('tenants.operate');

  r.get('/v1/admin/tenants', auth, operate, async (req, res) => {
    const page = await listTenants(ctx, { cursor: req.query.cursor as string | undefined, limit: req.query.limit as number | undefined, q: req.query.q as string | undefined });
    res.json({ items: await Promise.all(page.items.map((t) => tenantView(ctx.db.manager, t))), nextCursor: page.nextCursor });
  });

  r.post('/v1/admin/tenants', auth, operate, async (req, res) => {
    const input = { slug: req.body.slug, name: req.body.name, planId: req.body.planId, ownerEmail: req.body.ownerEmail };
    const tenant = await createTenantWithOwner(ctx, input, await auditActorOf(ctx, req.principal), req.principal!.userId ?? null);
    res.status(201).json(await tenantView(ctx.db.manager, tenant));
  });

  r.get('/v1/admin/tenants/:id', auth, operate, async (req, res) => {
    res.json(await tenantView(ctx.db.manager, await getTenantOr404(ctx.db.manager, req.params.id as string)));
  });

  r.patch('/v1/admin/tenants/:id', auth, operate, async (req, res) => {
    const { name, planId, limitOverrides } = req.body;
    const tenant = await updateTenant(ctx, req.params.id as string, { name, planId, limitOverrides }, await auditActorOf(ctx, req.principal));
    res.json(await tenantView(ctx.db.manager, tenant));
  });

  r.post('/v1/admin/tenants/:id/suspend', auth, operate, async (req, res) => {
    const tenant = await setTenantSuspended(ctx, req.params.id as string, true, req.body?.reason ?? null, await auditActorOf(ctx, req.principal));
    res.json(await tenantView(ctx.db.manager, tenant));
  });

  r.post('/v1/admin/tenants/:id/resume', auth, operate, async (req, res) => {
    const tenant = await setTenantSuspended(ctx, req.params.id as string, false, null, await auditActorOf(ctx, req.principal));
    res.json(await tenantView(ctx.db.manager, tenant));
  });

  r.get('/v1/admin/tenants/:id/usage', auth, operate, async (req, res) => {
    res.json(await usageReport(ctx, req.params.id as string));
  });

  r.get('/v1/admin/audit-events', auth, operate, async (req, res) => {
    const page = await listAuditEvents(ctx, {
      tenantId: (req.query.tenantId as string | undefined) ?? null,
      action: req.query.action as string | undefined,
      cursor: req.query.cursor as string | undefined,
      limit: req.query.limit as number | undefined,
    });
    res.json({ items: page.items.map(auditEventView), nextCursor: page.nextCursor });
  });

  return r;
}
