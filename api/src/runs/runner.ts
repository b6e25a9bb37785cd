import { randomUUID } from 'node:crypto';
import os from 'node:os';
import type { AppContext } from '../context';
import { HighsSolverPool } from '../solver/highs-solver-pool';
import { announceEnding } from './events';
import { RUN_DEAD_QUEUE, RUN_QUEUE, startRunQueue, type RunJobData } from './queue';
import { superviseRun, type SolveFn } from './supervisor';
import { deadLetterRun } from './transitions';

export interface RunWorkerHandle {
  workerId: string;
  stop(): Promise<void>;
}

/** A run whose job exhausted its retries (its workers kept dying) ends failed instead of hanging. */
export async function endDeadLetteredRun(ctx: AppContext, runId: string): Promise<void> {
  await ctx.db.transaction(async (manager) => announceEnding(ctx, manager, runId, await deadLetterRun(manager, runId)));
}

/**
 * Subscribes `concurrency` pollers to the run queue (pg-boss 10 hands each poller one job at a
 * time), each supervising the runs it is handed, and one poller to the dead-letter queue.
 */
export async function startRunWorker(ctx: AppContext, opts: { concurrency?: number; solve?: SolveFn } = {}): Promise<RunWorkerHandle> {
  const boss = await startRunQueue(ctx);
  const workerId = `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
  const concurrency = Math.max(1, opts.concurrency ?? ctx.config.workerConcurrency);
  // One pool for every run this process takes: runs at once share its threads, never more.
  // Once stopped, its threads are ended as they fall idle; a run still solving goes on.
  const solver = new HighsSolverPool({ size: ctx.config.solverThreads });
  let stopped = false;
  const releaseIfStopped = () => {
    if (stopped) solver.releaseIdle();
  };
  const ids: string[] = [];
  const workOptions = { batchSize: 1, pollingIntervalSeconds: ctx.config.queuePollingSeconds };
  for (let i = 0; i < concurrency; i++) {
    ids.push(
      await boss.work<RunJobData>(RUN_QUEUE, workOptions, async ([job]) => {
        try {
          await superviseRun(ctx, job.data.runId, { workerId, solve: opts.solve, solver });
        } finally {
          releaseIfStopped();
        }
      }),
    );
  }
  ids.push(
    await boss.work<RunJobData>(RUN_DEAD_QUEUE, workOptions, async ([job]) => {
      await endDeadLetteredRun(ctx, job.data.runId);
    }),
  );
  ctx.log.info({ workerId, concurrency }, 'run worker started');
  return {
    workerId,
    async stop() {
      for (const id of ids) await boss.offWork({ id });
      stopped = true;
      releaseIfStopped();
    },
  };
}
