import { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { getOutboxMessage, listOutbox, outboxMessageView } from '../services/outbox';

export function outboxRouter(ctx: AppContext): Router {
  const r = Router();
  const auth = authenticate(ctx);

  r.get('/v1/admin/outbox', auth, authorize('outbox.read'), async (req, res) => {
    const page = await listOutbox(ctx, {
      kind: req.query.kind as string | undefined,
      tenantId: req.query.tenantId as string | undefined,
      to: req.query.to as string | undefined,
      cursor: req.query.cursor as string | undefined,
      limit: req.query.limit as number | undefined,
    });
    res.json({ items: page.items.map(outboxMessageView), nextCursor: page.nextCursor });
  });

  r.get('/v1/admin/outbox/:id', auth, authorize('outbox.read'), async (req, res) => {
    const m = await getOutboxMessage(ctx, req.params.id as string);
    res.json({ ...outboxMessageView(m), raw: m.raw });
  });

  return r;
}
