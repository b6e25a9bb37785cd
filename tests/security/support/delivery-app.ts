import { stopQueue } from '../../../api/src/services/job-queue';
import { startWebhookWorker } from '../../../api/src/services/webhook-delivery';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

export interface DeliveryApp {
  t: TestApp;
  apiKey: string;
  close(): Promise<void>;
}

/**
 * An app that delivers webhooks to loopback receivers (as in development), once and quickly:
 * no retries, the queue polled every half second.
 */
export async function startDeliveryApp(): Promise<DeliveryApp> {
  const t = await startTestApp({ WEBHOOK_ALLOW_LOOPBACK: 'true', WEBHOOK_RETRY_LIMIT: '0', QUEUE_POLLING_SECONDS: '0.5' });
  const { apiKey } = await createTenantWithKey(t.ctx);
  const worker = await startWebhookWorker(t.ctx);
  return {
    t,
    apiKey,
    async close() {
      await worker.stop();
      await stopQueue(t.ctx);
      await t.close();
    },
  };
}
