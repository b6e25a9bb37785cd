import { Webhook } from 'standardwebhooks';
import type { AppContext } from '../context';
import type { DeliveryAttempt } from '../db/entities/webhook-delivery';
import { WebhookDelivery } from '../db/entities/webhook-delivery';
import { WebhookEndpoint } from '../db/entities/webhook-endpoint';
import { JobPump } from './job-pump';
import { composeMail, sendMail, tenantOwnerEmails } from './mail';
import { startQueue, WEBHOOK_DEAD_QUEUE, WEBHOOK_QUEUE, type WebhookJobData } from './job-queue';
import { guardedPost } from './ssrf-guard';
import { dispatchNextDelivery } from './webhook-dispatch';
import type { WorkerPresence } from './worker-presence';

export class DeliveryFailedError extends Error {}

/**
 * One attempt at one delivery, within WEBHOOK_TIMEOUT_MS for the whole exchange. Signed per
 * Standard Webhooks (`webhook-id`, `webhook-timestamp`, `webhook-signature: v1,<base64
 * HMAC-SHA256 of id.timestamp.body>`). A 2xx answer delivers it; anything else (including a
 * redirect, which is never followed) throws so pg-boss retries with exponential backoff, until the
 * retry limit or until the endpoint is disabled after `webhookDisableAfterFailures` consecutive
 * failures. The receiver's body is never interpreted. The transaction that ends a delivery
 * dispatches its endpoint's next one (`webhook-dispatch.ts`).
 */
export async function attemptDelivery(ctx: AppContext, deliveryId: string, isLastAttempt: boolean): Promise<void> {
  const delivery = await ctx.db.manager.findOneBy(WebhookDelivery, { id: deliveryId });
  if (!delivery || delivery.status !== 'pending') return;
  const endpoint = await ctx.db.manager.findOneBy(WebhookEndpoint, { id: delivery.endpointId });
  if (!endpoint) return;
  if (!endpoint.enabled) {
    await ctx.db.query(`UPDATE webhook_deliveries SET status = 'abandoned' WHERE endpoint_id = $1 AND status = 'pending'`, [endpoint.id]);
    return;
  }

  const body = JSON.stringify(delivery.payload);
  const now = new Date();
  const signature = new Webhook(endpoint.secret).sign(delivery.messageId, now, body);
  const started = Date.now();
  let attempt: DeliveryAttempt;
  try {
    const res = await guardedPost(endpoint.url, body, {
      allowLoopback: ctx.config.webhookAllowLoopback,
      timeoutMs: ctx.config.webhookTimeoutMs,
      maxResponseBytes: ctx.config.webhookMaxResponseBytes,
      headers: {
        'content-type': 'application/json',
        'user-agent': 'Gridwright-Webhooks/1',
        'webhook-id': delivery.messageId,
        'webhook-timestamp': String(Math.floor(now.getTime() / 1000)),
        'webhook-signature': signature,
      },
    });
    const ok = res.statusCode >= 200 && res.statusCode < 300;
    const error = ok ? null : res.statusCode >= 300 && res.statusCode < 400 ? 'redirect not followed' : `answered HTTP ${res.statusCode}`;
    attempt = { at: now.toISOString(), statusCode: res.statusCode, error, durationMs: Date.now() - started };
  } catch (err) {
    attempt = { at: now.toISOString(), statusCode: null, error: (err as Error).message.slice(0, 500), durationMs: Date.now() - started };
  }

  if (attempt.error === null) {
    await ctx.db.transaction(async (m) => {
      await m.query(
        `UPDATE webhook_deliveries SET status = 'succeeded', delivered_at = now(), attempts = attempts || $2::jsonb WHERE id = $1`,
        [deliveryId, JSON.stringify([attempt])],
      );
      await m.query('UPDATE webhook_endpoints SET consecutive_failures = 0 WHERE id = $1', [endpoint.id]);
      await dispatchNextDelivery(ctx, m, endpoint.id);
    });
    return;
  }

  const { disabledNow, giveUp } = await ctx.db.transaction(async (m) => {
    const [endpointRows] = await m.query(
      `UPDATE webhook_endpoints SET consecutive_failures = consecutive_failures + 1,
              enabled = CASE WHEN consecutive_failures + 1 >= $2 THEN false ELSE enabled END,
              disabled_at = CASE WHEN enabled AND consecutive_failures + 1 >= $2 THEN now() ELSE disabled_at END,
              disabled_reason = CASE WHEN enabled AND consecutive_failures + 1 >= $2 THEN $3 ELSE disabled_reason END
        WHERE id = $1 RETURNING enabled, disabled_at = now() AS disabled_now`,
      [endpoint.id, ctx.config.webhookDisableAfterFailures, `${ctx.config.webhookDisableAfterFailures} consecutive failed deliveries`],
    );
    const row = endpointRows[0] as { enabled: boolean; disabled_now: boolean } | undefined;
    const stop = isLastAttempt || !row?.enabled;
    await m.query(`UPDATE webhook_deliveries SET attempts = attempts || $2::jsonb, status = CASE WHEN $3 THEN 'failed' ELSE status END WHERE id = $1`, [
      deliveryId,
      JSON.stringify([attempt]),
      stop,
    ]);
    if (stop) await dispatchNextDelivery(ctx, m, endpoint.id);
    return { disabledNow: Boolean(row?.disabled_now && !row.enabled), giveUp: stop };
  });
  if (disabledNow) await tellOwnersEndpointDisabled(ctx, endpoint);
  if (!giveUp) throw new DeliveryFailedError(`delivery ${deliveryId} to ${endpoint.url}: ${attempt.error}`);
}

async function tellOwnersEndpointDisabled(ctx: AppContext, endpoint: WebhookEndpoint) {
  const heading = 'A webhook endpoint was disabled';
  const mail = composeMail(ctx, {
    tenantName: null,
    heading,
    paragraphs: [
      `Gridwright stopped sending events to ${endpoint.url} after ${ctx.config.webhookDisableAfterFailures} consecutive failed deliveries.`,
      'Fix the receiver, then enable the endpoint again; its delivery log shows each attempt and the answer it got.',
    ],
    link: { label: 'Open the endpoint in the console', path: `/webhooks/${endpoint.id}` },
  });
  try {
    await sendMail(ctx, { to: await tenantOwnerEmails(ctx, endpoint.tenantId), subject: heading, ...mail, tenantId: endpoint.tenantId, kind: 'webhook-disabled' });
  } catch (err) {
    ctx.log.error({ err, endpointId: endpoint.id }, 'webhook-disabled e-mail failed');
  }
}

/** A delivery whose job kept failing (its workers crashed) ends failed, and its endpoint's next goes out. */
async function endDeadLetteredDelivery(ctx: AppContext, deliveryId: string): Promise<void> {
  await ctx.db.transaction(async (m) => {
    const [rows]: [{ endpoint_id: string }[], number] = await m.query(
      `UPDATE webhook_deliveries SET status = 'failed' WHERE id = $1 AND status = 'pending' RETURNING endpoint_id`,
      [deliveryId],
    );
    if (rows.length) await dispatchNextDelivery(ctx, m, rows[0].endpoint_id);
  });
}

/**
 * Attempts deliveries in WEBHOOK_CONCURRENCY slots and ends dead-lettered ones. With a worker's
 * presence it is woken as soon as a delivery is dispatched; without one it polls. A receiver that
 * answers slowly holds one slot for at most WEBHOOK_TIMEOUT_MS.
 */
export async function startWebhookWorker(ctx: AppContext, presence?: WorkerPresence): Promise<{ stop(graceMs?: number): Promise<void> }> {
  const boss = await startQueue(ctx);
  const pollMs = ctx.config.queuePollingSeconds * 1000;
  const deliveries = new JobPump<WebhookJobData>({
    boss,
    queue: WEBHOOK_QUEUE,
    slots: ctx.config.webhookConcurrency,
    pollMs,
    log: ctx.log,
    handle: (job) => attemptDelivery(ctx, job.data.deliveryId, job.retryCount >= job.retryLimit),
  }).start();
  const deadLetters = new JobPump<WebhookJobData>({
    boss,
    queue: WEBHOOK_DEAD_QUEUE,
    slots: 1,
    pollMs,
    log: ctx.log,
    handle: (job) => endDeadLetteredDelivery(ctx, job.data.deliveryId),
  }).start();
  const unsubscribe = presence?.onWake(WEBHOOK_QUEUE, () => deliveries.wake());
  return {
    async stop(graceMs?: number) {
      unsubscribe?.();
      await Promise.all([deliveries.stop(graceMs), deadLetters.stop(graceMs)]);
    },
  };
}
