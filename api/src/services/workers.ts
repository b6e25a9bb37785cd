import { randomUUID } from 'node:crypto';
import os from 'node:os';
import { startBillingSweeps } from '../billing/billing-sweeps';
import type { AppContext } from '../context';
import { startRunWorker } from '../runs/runner';
import type { SolveFn } from '../runs/supervisor';
import { purgeExpiredIdempotencyKeys } from './idempotency';
import { startWebhookWorker } from './webhook-delivery';
import { WorkerPresence } from './worker-presence';

const PURGE_EVERY_MS = 60 * 60 * 1000;

/**
 * Everything a worker process does: solve runs, deliver webhooks, forget expired Idempotency-Keys,
 * end billing grace periods and resend usage reports.
 * Its presence in the database (`worker-presence.ts`) is what other workers go by to tell whether
 * the runs it holds are still in hand.
 */
export async function startWorkers(ctx: AppContext, opts: { concurrency?: number; solve?: SolveFn } = {}) {
  // Written into `runs.worker_id`: which process holds a run.
  const workerId = `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
  const presence = new WorkerPresence({ databaseUrl: ctx.config.databaseUrl, workerId, log: ctx.log });
  await presence.start();
  const runs = await startRunWorker(ctx, { ...opts, workerId, presence });
  const hooks = await startWebhookWorker(ctx, presence);
  const billing = startBillingSweeps(ctx);
  const purge = setInterval(() => {
    purgeExpiredIdempotencyKeys(ctx.db.manager).catch((err) => ctx.log.warn({ err }, 'purging idempotency keys failed'));
  }, PURGE_EVERY_MS);
  purge.unref();
  return {
    workerId,
    /** Stops taking work; waits up to `graceMs` for what is in hand (all of it by default), then leaves. */
    async stop(graceMs?: number) {
      clearInterval(purge);
      await Promise.all([runs.stop(graceMs), hooks.stop(graceMs), billing.stop()]);
      await presence.stop();
    },
  };
}
