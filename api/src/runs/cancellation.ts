import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Run } from '../db/entities/run';
import { HttpProblem } from '../lib/problem';
import { announceEnding } from './events';
import { dropRunJob } from './queue';
import { getRun } from './reading';
import { cancelQueuedRun, requestCancel } from './transitions';

/**
 * A queued run is cancelled at once and its job leaves the queue, so it takes no worker's turn. A running run
 * is flagged; the worker holding it sees the flag, terminates the solver and ends it cancelled.
 * Cancelling a cancelled run again is accepted; any other finished run is 409.
 */
export async function cancelRun(ctx: AppContext, tenantId: string, id: string): Promise<Run> {
  const run = await getRun(ctx, tenantId, id);
  await ctx.db.transaction(async (manager) => {
    if (await stopRun(ctx, manager, run.id)) return;
    const current = await manager.findOneByOrFail(Run, { id: run.id });
    if (current.status === 'cancelled') return;
    throw new HttpProblem({
      status: 409,
      slug: 'run-finished',
      title: 'The run has already finished',
      detail: `Run ${run.id} is ${current.status}; only queued or running runs can be cancelled.`,
    });
  });
  return getRun(ctx, tenantId, id);
}

/**
 * Cancels a queued run (its job leaves the queue, its event is queued) or flags a running one, on
 * the caller's transaction. False when the run has already ended.
 */
export async function stopRun(ctx: AppContext, manager: EntityManager, runId: string): Promise<boolean> {
  const cancelled = await cancelQueuedRun(manager, runId);
  if (cancelled) {
    if (cancelled.jobId) await dropRunJob(ctx, manager, cancelled.jobId);
    await announceEnding(ctx, manager, runId, cancelled);
    return true;
  }
  return requestCancel(manager, runId);
}
