import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { auditEventView, listAuditEvents } from '../services/audit';

export function auditRouter(ctx: AppContext): Router {
  const r = strictRouter();
  r.get('/v1/audit-events', authenticate(ctx), authorize('audit.read'), async (req, res) => {
    const page = await listAuditEvents(ctx, {
      tenantId: req.principal!.tenantId,
      action: req.query.action as string | undefined,
      cursor: req.query.cursor as string | undefined,
      limit: req.query.limit as number | undefined,
    });
    res.json({ items: page.items.map(auditEventView), nextCursor: page.nextCursor });
  });
  return r;
}
