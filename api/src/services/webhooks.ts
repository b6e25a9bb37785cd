import { randomBytes, randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { WebhookDelivery } from '../db/entities/webhook-delivery';
import { WebhookEndpoint, type WebhookEvent } from '../db/entities/webhook-endpoint';
import { notFound, validationProblem } from '../lib/problem';
import { isUuid } from '../lib/uuid';
import { runLinks } from '../runs/view';
import { assertWebhookEndpointAllowed } from './quotas';
import { assertSafeWebhookUrl, UnsafeUrlError } from './ssrf-guard';
import { dispatchNextDelivery } from './webhook-dispatch';

export const WEBHOOK_EVENTS: readonly WebhookEvent[] = ['run.succeeded', 'run.failed', 'run.cancelled'];
export const TEST_EVENT = 'webhook.test';

/** A Standard Webhooks signing secret: `whsec_` and 32 random bytes in base64. */
export const newSigningSecret = () => `whsec_${randomBytes(32).toString('base64')}`;
const newMessageId = () => `msg_${randomUUID().replace(/-/g, '')}`;

function eventPayload(type: string, data: Record<string, unknown>) {
  return { type, timestamp: new Date().toISOString(), data };
}

function runEventData(run: Run) {
  return {
    runId: run.id,
    name: run.name,
    status: run.status,
    outcome: run.outcome,
    finishedAt: run.finishedAt?.toISOString() ?? null,
    objective: (run.result as { objective?: unknown } | null)?.objective ?? null,
    error: run.error,
    links: runLinks(run.id),
  };
}

/**
 * Queues one delivery per enabled endpoint subscribed to `event`, in the caller's transaction so
 * the event exists exactly when the run's final state does; each goes out in its endpoint's turn.
 */
export async function enqueueRunEvent(ctx: AppContext, manager: EntityManager, runId: string, event: WebhookEvent): Promise<void> {
  const run = await manager.findOneByOrFail(Run, { id: runId });
  // In the order of their ids: the order in which `dispatchNextDelivery` locks endpoints.
  const endpoints: { id: string }[] = await manager.query(
    'SELECT id FROM webhook_endpoints WHERE tenant_id = $1 AND enabled AND $2 = ANY(events) ORDER BY id',
    [run.tenantId, event],
  );
  const payload = eventPayload(event, runEventData(run));
  for (const endpoint of endpoints) {
    const rows: { id: string }[] = await manager.query(
      `INSERT INTO webhook_deliveries (tenant_id, endpoint_id, run_id, event, message_id, payload)
       VALUES ($1, $2, $3, $4, $5, $6) ON CONFLICT DO NOTHING RETURNING id`,
      [run.tenantId, endpoint.id, run.id, event, newMessageId(), JSON.stringify(payload)],
    );
    if (rows.length) await dispatchNextDelivery(ctx, manager, endpoint.id);
  }
}

export function endpointView(e: WebhookEndpoint) {
  return {
    id: e.id,
    url: e.url,
    description: e.description,
    events: e.events,
    enabled: e.enabled,
    disabledAt: e.disabledAt?.toISOString() ?? null,
    disabledReason: e.disabledReason,
    consecutiveFailures: e.consecutiveFailures,
    createdAt: e.createdAt.toISOString(),
    updatedAt: e.updatedAt.toISOString(),
    secretRotatedAt: e.secretRotatedAt?.toISOString() ?? null,
  };
}

export function deliveryView(d: WebhookDelivery) {
  return {
    id: d.id,
    endpointId: d.endpointId,
    runId: d.runId,
    event: d.event,
    messageId: d.messageId,
    status: d.status,
    attempts: d.attempts,
    createdAt: d.createdAt.toISOString(),
    deliveredAt: d.deliveredAt?.toISOString() ?? null,
    payload: d.payload,
  };
}

async function checkedUrl(ctx: AppContext, url: string): Promise<string> {
  try {
    return (await assertSafeWebhookUrl(url, { allowLoopback: ctx.config.webhookAllowLoopback })).toString();
  } catch (err) {
    if (err instanceof UnsafeUrlError) throw validationProblem([{ pointer: '/url', message: err.message }]);
    throw err;
  }
}

function checkedEvents(events: string[]): WebhookEvent[] {
  const unknown = events.findIndex((e) => !WEBHOOK_EVENTS.includes(e as WebhookEvent));
  if (unknown >= 0) throw validationProblem([{ pointer: `/events/${unknown}`, message: `must be one of ${WEBHOOK_EVENTS.join(', ')}` }]);
  return [...new Set(events)] as WebhookEvent[];
}

export interface EndpointInput {
  url: string;
  events?: string[];
  description?: string | null;
}

/** Up to the plan's cap on endpoints per tenant (422 above it). */
export async function createEndpoint(ctx: AppContext, tenantId: string, input: EndpointInput) {
  const url = await checkedUrl(ctx, input.url);
  const events = checkedEvents(input.events ?? [...WEBHOOK_EVENTS]);
  const secret = newSigningSecret();
  return ctx.db.transaction(async (manager) => {
    await assertWebhookEndpointAllowed(ctx, manager, tenantId);
    const [row] = await manager.query(
      `INSERT INTO webhook_endpoints (tenant_id, url, description, events, secret) VALUES ($1, $2, $3, $4, $5) RETURNING id`,
      [tenantId, url, input.description ?? null, events, secret],
    );
    const endpoint = await manager.findOneByOrFail(WebhookEndpoint, { id: row.id });
    return { endpoint, secret };
  });
}

export async function getEndpoint(ctx: AppContext, tenantId: string, id: string): Promise<WebhookEndpoint> {
  const endpoint = isUuid(id) ? await ctx.db.manager.findOneBy(WebhookEndpoint, { id, tenantId }) : null;
  if (!endpoint) throw notFound(`Webhook endpoint ${id}`);
  return endpoint;
}

export function listEndpoints(ctx: AppContext, tenantId: string) {
  return ctx.db.manager.find(WebhookEndpoint, { where: { tenantId }, order: { createdAt: 'DESC', id: 'DESC' } });
}

export async function updateEndpoint(
  ctx: AppContext,
  tenantId: string,
  id: string,
  patch: { url?: string; events?: string[]; description?: string | null; enabled?: boolean },
) {
  const endpoint = await getEndpoint(ctx, tenantId, id);
  if (patch.url !== undefined) endpoint.url = await checkedUrl(ctx, patch.url);
  if (patch.events !== undefined) endpoint.events = checkedEvents(patch.events);
  if (patch.description !== undefined) endpoint.description = patch.description;
  if (patch.enabled !== undefined && patch.enabled !== endpoint.enabled) {
    endpoint.enabled = patch.enabled;
    // Turning an endpoint back on starts its failure count afresh.
    endpoint.consecutiveFailures = 0;
    endpoint.disabledAt = patch.enabled ? null : new Date();
    endpoint.disabledReason = patch.enabled ? null : 'disabled by a member';
  }
  endpoint.updatedAt = new Date();
  return ctx.db.manager.save(endpoint);
}

export async function deleteEndpoint(ctx: AppContext, tenantId: string, id: string) {
  const endpoint = await getEndpoint(ctx, tenantId, id);
  await ctx.db.manager.delete(WebhookEndpoint, { id: endpoint.id });
}

/** The previous secret stops working at once; the new one is returned this one time. */
export async function rotateSecret(ctx: AppContext, tenantId: string, id: string) {
  const endpoint = await getEndpoint(ctx, tenantId, id);
  endpoint.secret = newSigningSecret();
  endpoint.secretRotatedAt = new Date();
  endpoint.updatedAt = new Date();
  await ctx.db.manager.save(endpoint);
  return { endpoint, secret: endpoint.secret };
}

export async function sendTestEvent(ctx: AppContext, tenantId: string, id: string) {
  const endpoint = await getEndpoint(ctx, tenantId, id);
  return ctx.db.transaction(async (manager) => {
    const payload = eventPayload(TEST_EVENT, { endpointId: endpoint.id, message: 'A test event from Gridwright.' });
    const [row] = await manager.query(
      `INSERT INTO webhook_deliveries (tenant_id, endpoint_id, event, message_id, payload) VALUES ($1, $2, $3, $4, $5) RETURNING id`,
      [tenantId, endpoint.id, TEST_EVENT, newMessageId(), JSON.stringify(payload)],
    );
    await dispatchNextDelivery(ctx, manager, endpoint.id);
    return manager.findOneByOrFail(WebhookDelivery, { id: row.id });
  });
}

export function listDeliveries(ctx: AppContext, where: { tenantId: string; endpointId?: string; runId?: string }, limit = 100) {
  return ctx.db.manager.find(WebhookDelivery, { where, order: { createdAt: 'DESC', id: 'DESC' }, take: limit });
}
