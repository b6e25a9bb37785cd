import { randomUUID } from 'node:crypto';
import type PgBoss from 'pg-boss';
import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { queueExpirySeconds } from '../engine/deadline';
import { createQueueRacing, onTransaction, startQueue, wakeConsumers } from '../services/job-queue';

export const RUN_QUEUE = 'run-solve';
/** A job whose handler kept failing ends up here, and its run is marked failed. */
export const RUN_DEAD_QUEUE = 'run-solve-dead';

export interface RunJobData {
  runId: string;
  /** The job's own id, repeated so that its dead-letter copy still names it. */
  jobId: string;
}

/** Where a run waits: the job that may start it and the tenant-fair round it is served in. */
export interface QueuePlace {
  jobId: string;
  round: number;
}

const created = new WeakMap<PgBoss, Promise<void>>();

/** pg-boss, started, with the run queues in place (createQueue before send or fetch). */
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
 * A place in the queue, fair across tenants. pg-boss hands out jobs by priority, then by age, and
 * a run's priority is minus its round. A tenant's next run goes one round after its last queued
 * run, so its own runs stay first in, first out; a tenant with nothing queued joins the round now
 * being served (the lowest queued). One tenant's backlog of 50 runs therefore holds another
 * tenant's run back by at most one of its own, and a steady stream of newcomers cannot starve the
 * backlog either: they join its current round, they do not jump it.
 * `tenantId` null: the place of a run queued again after its worker was lost, at the front.
 * Call it under the tenant's submission lock (`assertRunAllowed`) so two runs never share a round.
 */
export async function placeInQueue(db: Pick<EntityManager, 'query'>, tenantId: string | null): Promise<QueuePlace> {
  const [row]: { round: number }[] = await db.query(
    `SELECT coalesce((SELECT max(queue_round) + 1 FROM runs WHERE tenant_id = $1 AND status = 'queued'),
                     (SELECT min(queue_round) FROM runs WHERE status = 'queued'),
                     0)::int AS round`,
    [tenantId],
  );
  return { jobId: randomUUID(), round: row.round };
}

/**
 * Sends the job of a run that has just been placed, on the caller's transaction, so the run and
 * its job are committed together, and rings the idle workers. The job retries only when its
 * handler throws (the database failed under it); after the retries it is dead-lettered and the
 * run ends failed. A worker that dies is noticed by the orphan sweep, not by the job's expiry.
 */
export async function sendRunJob(
  ctx: Pick<AppContext, 'boss' | 'config'>,
  manager: EntityManager,
  run: { id: string; timeLimitSeconds: number },
  place: QueuePlace,
): Promise<void> {
  const boss = await startRunQueue(ctx);
  const id = await boss.send(RUN_QUEUE, { runId: run.id, jobId: place.jobId } satisfies RunJobData, {
    id: place.jobId,
    db: onTransaction(manager),
    priority: -place.round,
    retryLimit: ctx.config.runRetryLimit,
    retryDelay: 1,
    deadLetter: RUN_DEAD_QUEUE,
    expireInSeconds: queueExpirySeconds(run.timeLimitSeconds, ctx.config.runExpiryGraceSeconds),
  });
  if (!id) throw new Error(`the queue refused run ${run.id}`);
  await wakeConsumers(manager, RUN_QUEUE);
}

/** Takes a job that can no longer start its run out of the queue (the run was cancelled or queued again). */
export async function dropRunJob(ctx: Pick<AppContext, 'boss' | 'config'>, manager: EntityManager, jobId: string): Promise<void> {
  const boss = await startRunQueue(ctx);
  await boss.cancel(RUN_QUEUE, jobId, { db: onTransaction(manager) });
}
