import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import { getOutboxMessage, listOutbox, outboxMessageDetail, outboxMessageView } from '../services/outbox';

export function outboxRouter(ctx: AppContext): Router {
  const r = strictRouter();
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
    res.json(outboxMessageDetail(await getOutboxMessage(ctx, req.params.id as string)));
  });

  return r;
}
