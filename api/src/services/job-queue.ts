import PgBoss from 'pg-boss';
import type { EntityManager } from 'typeorm';
import type { Config } from '../config';
import type { AppContext } from '../context';
import type { Logger } from '../lib/logger';
import { QUEUE_WAKE_CHANNEL } from './worker-presence';

export const WEBHOOK_QUEUE = 'webhook-delivery';
export const WEBHOOK_DEAD_QUEUE = 'webhook-delivery-dead';

export interface WebhookJobData {
  deliveryId: string;
}

export function createBoss(config: Config, log: Logger): PgBoss {
  const boss = new PgBoss({
    connectionString: config.databaseUrl,
    schema: 'pgboss',
    max: 4,
    application_name: 'gridwright-queue',
    maintenanceIntervalSeconds: config.queueMaintenanceSeconds,
  });
  boss.on('error', (err) => log.warn({ err }, 'queue error'));
  return boss;
}

const ready = new WeakMap<PgBoss, Promise<PgBoss>>();

const RACE_CODES = new Set(['40P01', '23505', '40001']);

/**
 * Worker processes that start together all create the same queues; pg-boss's createQueue can then
 * deadlock or hit its unique key. The queue exists once any of them wins, so retry.
 */
export async function createQueueRacing(boss: PgBoss, name: string, options: { deadLetter?: string; retryLimit?: number } = {}) {
  for (let attempt = 1; ; attempt++) {
    try {
      await boss.createQueue(name, { name, ...options });
      return;
    } catch (err) {
      if (attempt >= 5 || !RACE_CODES.has((err as { code?: string }).code ?? '')) throw err;
      await new Promise((r) => setTimeout(r, 50 * attempt + Math.random() * 100));
    }
  }
}

/**
 * Starts pg-boss once per process and makes sure the webhook queues exist (createQueue before send);
 * the run queues are made by `runs/queue.ts` on first use.
 */
export function startQueue(ctx: Pick<AppContext, 'boss' | 'config'>): Promise<PgBoss> {
  let started = ready.get(ctx.boss);
  if (!started) {
    started = (async () => {
      await ctx.boss.start();
      await createQueueRacing(ctx.boss, WEBHOOK_DEAD_QUEUE);
      await createQueueRacing(ctx.boss, WEBHOOK_QUEUE, { deadLetter: WEBHOOK_DEAD_QUEUE });
      return ctx.boss;
    })();
    started.catch(() => ready.delete(ctx.boss));
    ready.set(ctx.boss, started);
  }
  return started;
}

export async function stopQueue(ctx: Pick<AppContext, 'boss'>, opts: { graceful?: boolean } = {}): Promise<void> {
  if (!ready.has(ctx.boss)) return;
  ready.delete(ctx.boss);
  await ctx.boss.stop({ graceful: opts.graceful ?? true, wait: true, timeout: 5_000 });
}

/** pg-boss runs its INSERT on our transaction, so a row and its job are committed together or not at all. */
export function onTransaction(manager: EntityManager) {
  return { executeSql: async (text: string, values: unknown[]) => ({ rows: await manager.query(text, values) }) };
}

/** Rings the idle consumers of `queue` once the caller's transaction commits (they LISTEN through `WorkerPresence`). */
export async function wakeConsumers(manager: EntityManager, queue: string): Promise<void> {
  await manager.query('SELECT pg_notify($1, $2)', [QUEUE_WAKE_CHANNEL, queue]);
}

/** Sends a delivery's job on the caller's transaction; only `webhook-dispatch.ts` decides when. */
export async function enqueueWebhookDelivery(ctx: Pick<AppContext, 'boss' | 'config'>, manager: EntityManager, deliveryId: string): Promise<void> {
  const boss = await startQueue(ctx);
  const id = await boss.send(WEBHOOK_QUEUE, { deliveryId } satisfies WebhookJobData, {
    db: onTransaction(manager),
    retryLimit: ctx.config.webhookRetryLimit,
    retryDelay: ctx.config.webhookRetryDelaySeconds,
    retryBackoff: true,
    deadLetter: WEBHOOK_DEAD_QUEUE,
    expireInSeconds: Math.ceil(ctx.config.webhookTimeoutMs / 1000) + 30,
  });
  if (!id) throw new Error(`the queue refused webhook delivery ${deliveryId}`);
  await wakeConsumers(manager, WEBHOOK_QUEUE);
}
