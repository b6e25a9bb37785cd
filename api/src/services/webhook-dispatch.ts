import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { enqueueWebhookDelivery } from './job-queue';

/**
 * Deliveries to one endpoint go out one at a time, in the order of their events. An endpoint has
 * at most one pending delivery with a queue job (`dispatched_at` set); the transaction that ends
 * it (delivered, failed for good, dead-lettered) dispatches the endpoint's next. So a slow or
 * failing receiver holds at most one delivery slot of the whole system, and only its own later
 * deliveries wait behind it; and the queue holds at most one job per endpoint, taken oldest first,
 * so deliveries are served in turn across endpoints — across tenants too, up to the plan's cap on
 * endpoints.
 *
 * Call it on the transaction that inserts or ends a delivery of `endpointId`. It locks the
 * endpoint's row, so whatever dispatches for one endpoint is serialized; callers that dispatch
 * for several endpoints go in the order of their ids, so two of them never wait on each other.
 * A disabled endpoint's waiting deliveries are abandoned instead.
 */
export async function dispatchNextDelivery(ctx: Pick<AppContext, 'boss' | 'config'>, manager: EntityManager, endpointId: string): Promise<void> {
  const [endpoint]: { enabled: boolean }[] = await manager.query('SELECT enabled FROM webhook_endpoints WHERE id = $1 FOR UPDATE', [endpointId]);
  if (!endpoint) return;
  if (!endpoint.enabled) {
    await manager.query(`UPDATE webhook_deliveries SET status = 'abandoned' WHERE endpoint_id = $1 AND status = 'pending' AND dispatched_at IS NULL`, [endpointId]);
    return;
  }
  const [rows]: [{ id: string }[], number] = await manager.query(
    `UPDATE webhook_deliveries SET dispatched_at = now()
      WHERE id = (SELECT id FROM webhook_deliveries WHERE endpoint_id = $1 AND status = 'pending' AND dispatched_at IS NULL ORDER BY created_at, id LIMIT 1)
        AND NOT EXISTS (SELECT 1 FROM webhook_deliveries WHERE endpoint_id = $1 AND status = 'pending' AND dispatched_at IS NOT NULL)
      RETURNING id`,
    [endpointId],
  );
  if (rows.length) await enqueueWebhookDelivery(ctx, manager, rows[0].id);
}
