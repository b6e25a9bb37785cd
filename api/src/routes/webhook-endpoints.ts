import type { Router } from 'express';
import { authenticate, authorize } from '../auth/middleware';
import type { AppContext } from '../context';
import { strictRouter } from '../lib/strict-router';
import {
  createEndpoint,
  deleteEndpoint,
  deliveryView,
  endpointView,
  getEndpoint,
  listDeliveries,
  listEndpoints,
  rotateSecret,
  sendTestEvent,
  updateEndpoint,
} from '../services/webhooks';

export function webhookEndpointsRouter(ctx: AppContext): Router {
  const r = strictRouter();
  const auth = authenticate(ctx);
  const tenant = (req: { principal?: { tenantId: string } }) => req.principal!.tenantId;

  r.get('/v1/webhook-endpoints', auth, authorize('webhooks.read'), async (req, res) => {
    res.json({ items: (await listEndpoints(ctx, tenant(req))).map(endpointView) });
  });

  // The signing secret is in this answer and the rotation's, and never again.
  r.post('/v1/webhook-endpoints', auth, authorize('webhooks.manage'), async (req, res) => {
    const { url, events, description } = req.body;
    const { endpoint, secret } = await createEndpoint(ctx, tenant(req), { url, events, description });
    res.status(201).location(`/v1/webhook-endpoints/${endpoint.id}`).json({ ...endpointView(endpoint), secret });
  });

  r.get('/v1/webhook-endpoints/:endpointId', auth, authorize('webhooks.read'), async (req, res) => {
    res.json(endpointView(await getEndpoint(ctx, tenant(req), String(req.params.endpointId))));
  });

  r.patch('/v1/webhook-endpoints/:endpointId', auth, authorize('webhooks.manage'), async (req, res) => {
    const { url, events, description, enabled } = req.body;
    res.json(endpointView(await updateEndpoint(ctx, tenant(req), String(req.params.endpointId), { url, events, description, enabled })));
  });

  r.delete('/v1/webhook-endpoints/:endpointId', auth, authorize('webhooks.manage'), async (req, res) => {
    await deleteEndpoint(ctx, tenant(req), String(req.params.endpointId));
    res.status(204).end();
  });

  r.post('/v1/webhook-endpoints/:endpointId/rotate-secret', auth, authorize('webhooks.manage'), async (req, res) => {
    const { endpoint, secret } = await rotateSecret(ctx, tenant(req), String(req.params.endpointId));
    res.json({ ...endpointView(endpoint), secret });
  });

  r.post('/v1/webhook-endpoints/:endpointId/test', auth, authorize('webhooks.manage'), async (req, res) => {
    const delivery = await sendTestEvent(ctx, tenant(req), String(req.params.endpointId));
    res.status(202).json(deliveryView(delivery));
  });

  r.get('/v1/webhook-endpoints/:endpointId/deliveries', auth, authorize('webhooks.read'), async (req, res) => {
    const endpoint = await getEndpoint(ctx, tenant(req), String(req.params.endpointId));
    res.json({ items: (await listDeliveries(ctx, { tenantId: endpoint.tenantId, endpointId: endpoint.id })).map(deliveryView) });
  });

  return r;
}
