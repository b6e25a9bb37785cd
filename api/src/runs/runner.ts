import type { AppContext } from '../context';
import { JobPump } from '../services/job-pump';
import type { WorkerPresence } from '../services/worker-presence';
import { HighsSolverPool } from '../solver/highs-solver-pool';
import { announceEnding } from './events';
import { startOrphanSweep } from './orphan-sweep';
import { RUN_DEAD_QUEUE, RUN_QUEUE, startRunQueue, type RunJobData } from './queue';
import { superviseRun, type SolveFn } from './supervisor';
import { deadLetterRun } from './transitions';

export interface RunWorkerHandle {
  /** Stops taking runs and waits up to `graceMs` for the runs in hand; runs still solving then are queued again by other workers once this process's presence ends. */
  stop(graceMs?: number): Promise<void>;
}

/** A run whose job kept failing ends failed instead of waiting for ever. */
export async function endDeadLetteredRun(ctx: AppContext, job: RunJobData): Promise<void> {
  await ctx.db.transaction(async (manager) => announceEnding(ctx, manager, job.runId, await deadLetterRun(manager, job.runId, job.jobId)));
}

/**
 * Solves runs in `concurrency` slots (WORKER_CONCURRENCY) that share one pool of SOLVER_THREADS
 * HiGHS threads, takes runs only while the process's presence lock is held (a run held by a
 * worker without it looks orphaned), ends dead-lettered runs, and sweeps for orphaned runs.
 */
export async function startRunWorker(
  ctx: AppContext,
  opts: { workerId: string; presence: WorkerPresence; concurrency?: number; solve?: SolveFn },
): Promise<RunWorkerHandle> {
  const { workerId, presence } = opts;
  const boss = await startRunQueue(ctx);
  const concurrency = Math.max(1, opts.concurrency ?? ctx.config.workerConcurrency);
  // Once stopped, the pool's threads are ended as they fall idle; a run still solving goes on.
  const solver = new HighsSolverPool({ size: ctx.config.solverThreads });
  let stopped = false;
  const releaseIfStopped = () => {
    if (stopped) solver.releaseIdle();
  };
  const pollMs = ctx.config.queuePollingSeconds * 1000;
  const runs = new JobPump<RunJobData>({
    boss,
    queue: RUN_QUEUE,
    slots: concurrency,
    pollMs,
    log: ctx.log,
    canFetch: () => presence.held,
    handle: (job) => superviseRun(ctx, { runId: job.data.runId, jobId: job.id }, { workerId, solve: opts.solve, solver }).finally(releaseIfStopped),
  }).start();
  const deadLetters = new JobPump<RunJobData>({ boss, queue: RUN_DEAD_QUEUE, slots: 1, pollMs, log: ctx.log, handle: (job) => endDeadLetteredRun(ctx, job.data) }).start();
  const unsubscribe = presence.onWake(RUN_QUEUE, () => runs.wake());
  const sweep = startOrphanSweep(ctx, { workerId, ownJobIds: () => runs.inFlightJobIds() });
  ctx.log.info({ workerId, concurrency, solverThreads: ctx.config.solverThreads }, 'run worker started');
  return {
    async stop(graceMs = Infinity) {
      unsubscribe();
      await sweep.stop();
      await Promise.all([runs.stop(graceMs), deadLetters.stop(graceMs)]);
      stopped = true;
      releaseIfStopped();
    },
  };
}
