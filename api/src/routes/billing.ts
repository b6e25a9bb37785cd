import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import { billingOverview, listInvoices, upcomingInvoice } from '../billing/billing-view';
import { startCheckout } from '../billing/checkout';
import { cancelAtPeriodEnd, resumeSubscription } from '../billing/plan-changes';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { auditActorOf } from '../services/audit';

export function billingRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.get('/v1/billing', auth, authorize('billing.read'), async (req, res) => {
    res.json(await billingOverview(ctx, req.principal!.tenantId));
  });

  r.post('/v1/billing/checkout', auth, authorize('billing.manage'), async (req, res) => {
    res.status(201).json(await startCheckout(ctx, { tenantId: req.principal!.tenantId, planId: req.body.planId }, await auditActorOf(ctx, req.principal)));
  });

  r.post('/v1/billing/subscription/cancel', auth, authorize('billing.manage'), async (req, res) => {
    await cancelAtPeriodEnd(ctx, req.principal!.tenantId, await auditActorOf(ctx, req.principal));
    res.json(await billingOverview(ctx, req.principal!.tenantId));
  });

  r.post('/v1/billing/subscription/resume', auth, authorize('billing.manage'), async (req, res) => {
    await resumeSubscription(ctx, req.principal!.tenantId, await auditActorOf(ctx, req.principal));
    res.json(await billingOverview(ctx, req.principal!.tenantId));
  });

  r.get('/v1/billing/invoices', auth, authorize('billing.read'), async (req, res) => {
    res.json(await listInvoices(ctx, req.principal!.tenantId, { limit: req.query.limit as number | undefined, cursor: req.query.cursor as string | undefined }));
  });

  r.get('/v1/billing/upcoming-invoice', auth, authorize('billing.read'), async (req, res) => {
    res.json(await upcomingInvoice(ctx, req.principal!.tenantId));
  });

  return r;
}
