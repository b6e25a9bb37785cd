import type PgBoss from 'pg-boss';
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { createQueueRacing, onTransaction, startQueue } from '../services/job-queue';
import { queueExpirySeconds } from '../engine/deadline';

export const RUN_QUEUE = 'run-solve';
/** Runs whose worker crashed more often than the retry limit end up here and are marked failed. */
export const RUN_DEAD_QUEUE = 'run-solve-dead';

export interface RunJobData {
  runId: string;
}

const created = new WeakMap<PgBoss, Promise<void>>();

/** pg-boss, started, with the run queues in place (createQueue before send or work). */
export async function startRunQueue(ctx: Pick<AppContext, 'boss' | 'config'>): Promise<PgBoss> {
  const boss = await startQueue(ctx);
  let queues = created.get(boss);
  if (!queues) {
    queues = (async () => {
      await createQueueRacing(boss, RUN_DEAD_QUEUE);
      await createQueueRacing(boss, RUN_QUEUE, { deadLetter: RUN_DEAD_QUEUE, retryLimit: ctx.config.runRetryLimit });
    })();
    queues.catch(() => created.delete(boss));
    created.set(boss, queues);
  }
  await queues;
  return boss;
}

/**
 * Queues a run's job on the caller's transaction, so the run and its job are committed together.
 * Only crashes are retried (a job whose worker stopped answering expires); after the retries it is
 * dead-lettered and the run ends failed.
 */
export async function enqueueRun(
  ctx: Pick<AppContext, 'boss' | 'config'>,
  manager: EntityManager,
  run: { id: string; timeLimitSeconds: number },
): Promise<void> {
  const boss = await startRunQueue(ctx);
  const id = await boss.send(RUN_QUEUE, { runId: run.id } satisfies RunJobData, {
    db: onTransaction(manager),
    retryLimit: ctx.config.runRetryLimit,
    retryDelay: 0,
    deadLetter: RUN_DEAD_QUEUE,
    expireInSeconds: queueExpirySeconds(run.timeLimitSeconds, ctx.config.runExpiryGraceSeconds),
  });
  if (!id) throw new Error(`the queue refused run ${run.id}`);
}
