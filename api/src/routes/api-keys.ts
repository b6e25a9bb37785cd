import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { optionalInstant } from '../lib/instants';
import { strictRouter } from '../lib/strict-router';
import { auditActorOf } from '../services/audit';
import { apiKeyView, createApiKey, getApiKey, listApiKeys, revokeApiKey } from '../services/api-keys';

export function apiKeysRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);

  r.get('/v1/api-keys', auth, authorize('keys.read'), async (req, res) => {
    const page = await listApiKeys(ctx, req.principal!.tenantId, {
      cursor: req.query.cursor as string | undefined,
      limit: req.query.limit as number | undefined,
      includeRevoked: req.query.includeRevoked as boolean | undefined,
    });
    res.json({ items: page.items.map(apiKeyView), nextCursor: page.nextCursor });
  });

  r.post('/v1/api-keys', auth, authorize('keys.manage'), async (req, res) => {
    const { key, apiKey } = await createApiKey(
      ctx,
      {
        tenantId: req.principal!.tenantId,
        name: req.body.name,
        scopes: req.body.scopes,
        expiresAt: optionalInstant(req.body.expiresAt, '/expiresAt') ?? null,
        createdBy: req.principal!.userId ?? null,
      },
      await auditActorOf(ctx, req.principal),
    );
    res.status(201).setHeader('Cache-Control', 'no-store').json({ key, apiKey: apiKeyView(apiKey) });
  });

  r.get('/v1/api-keys/:id', auth, authorize('keys.read'), async (req, res) => {
    res.json(apiKeyView(await getApiKey(ctx, req.principal!.tenantId, req.params.id as string)));
  });

  r.post('/v1/api-keys/:id/revoke', auth, authorize('keys.manage'), async (req, res) => {
    res.json(apiKeyView(await revokeApiKey(ctx, req.principal!.tenantId, req.params.id as string, await auditActorOf(ctx, req.principal))));
  });

  return r;
}
