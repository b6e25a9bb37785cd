import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import type { WebhookEvent } from '../db/entities/webhook-endpoint';
import { enqueueRunEvent } from '../services/webhooks';
import type { FinishedStatus } from './states';
import type { EndedRun } from './transitions';

const EVENT_FOR = { succeeded: 'run.succeeded', failed: 'run.failed', cancelled: 'run.cancelled' } as const satisfies Record<FinishedStatus, WebhookEvent>;

/**
 * Queues the webhook event of a run that an ending transition has just ended, on the transaction
 * that ended it: the event exists exactly when the final row does. Nothing when the transition
 * did not take effect.
 */
export async function announceEnding(ctx: AppContext, manager: EntityManager, runId: string, ended: EndedRun | null): Promise<void> {
  if (ended) await enqueueRunEvent(ctx, manager, runId, EVENT_FOR[ended.status]);
}
