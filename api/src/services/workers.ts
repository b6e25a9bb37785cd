import type { AppContext } from '../context';
import { startRunWorker } from '../runs/runner';
import type { SolveFn } from '../runs/supervisor';
import { purgeExpiredIdempotencyKeys } from './idempotency';
import { startWebhookWorker } from './webhook-delivery';

const PURGE_EVERY_MS = 60 * 60 * 1000;

/** Everything a worker process does: solve runs, deliver webhooks, forget expired Idempotency-Keys. */
export async function startWorkers(ctx: AppContext, opts: { concurrency?: number; solve?: SolveFn } = {}) {
  const runs = await startRunWorker(ctx, opts);
  const hooks = await startWebhookWorker(ctx);
  const purge = setInterval(() => {
    purgeExpiredIdempotencyKeys(ctx.db.manager).catch((err) => ctx.log.warn({ err }, 'purging idempotency keys failed'));
  }, PURGE_EVERY_MS);
  purge.unref();
  return {
    workerId: runs.workerId,
    async stop() {
      clearInterval(purge);
      await runs.stop();
      await hooks.stop();
    },
  };
}
