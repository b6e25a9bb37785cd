import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { presentWorkerHashesSql } from '../services/worker-presence';
import { announceEnding } from './events';
import { dropRunJob, placeInQueue, sendRunJob } from './queue';
import { deadLetterRun, requeueRun } from './transitions';

interface CandidateRow {
  id: string;
  attempts: number;
  job_id: string | null;
  time_limit_seconds: number;
  /** Its worker is gone or its heartbeat is stale: orphaned whoever sweeps. */
  abandoned: boolean;
}

export interface SweepScope {
  /** The sweeping worker: a run it holds is orphaned unless one of its jobs in hand is the run's job. */
  workerId: string;
  /** The sweeping worker's jobs in hand, read after the candidates are locked (see below). */
  ownJobIds: () => string[];
}

/**
 * Locks the running runs that may be orphaned; rows another sweeper or a committing attempt holds
 * are skipped, not waited for. A running run is orphaned when no live attempt supervises it:
 *   - its worker is gone: the worker's presence lock is not held (`services/worker-presence.ts`),
 *     which PostgreSQL releases the moment the process dies, whatever the time;
 *   - its heartbeat is older than RUN_HEARTBEAT_STALE_SECONDS: the backstop for a worker that is
 *     frozen, or whose host vanished while its connection still looks open;
 *   - the sweeping worker holds it, yet none of its jobs in hand is the run's job: the attempt
 *     ended without an ending (the database failed under it, a claim's answer was lost).
 * The last needs the jobs in hand read after the rows are locked: a job is in hand from before its
 * claim until after its ending commits, and a locked row can no longer be claimed or ended, so a run
 * that is running under this worker with a job not in hand then is truly left behind. Read before
 * the query, the list would miss a job whose claim committed in between, and its run would be
 * taken from a live attempt.
 */
async function lockCandidates(manager: EntityManager, workerId: string, staleSeconds: number): Promise<CandidateRow[]> {
  return manager.query(
    `WITH present AS MATERIALIZED (${presentWorkerHashesSql()})
     SELECT id, attempts, job_id, time_limit_seconds,
            (hashtext(worker_id)::oid NOT IN (SELECT objid FROM present) OR heartbeat_at < now() - make_interval(secs => $2)) AS abandoned
       FROM runs
      WHERE status = 'running'
        AND (worker_id = $1 OR hashtext(worker_id)::oid NOT IN (SELECT objid FROM present) OR heartbeat_at < now() - make_interval(secs => $2))
      ORDER BY heartbeat_at
      FOR UPDATE SKIP LOCKED`,
    [workerId, staleSeconds],
  );
}

/**
 * Queues every orphaned run again, with a new job at the front of the fair queue (its old job is
 * cancelled), or, once it has been attempted more than RUN_RETRY_LIMIT times over, ends it failed
 * with its webhook event. One transaction: a run is never both queued again and left running, and
 * two sweepers never queue one run twice. Answers how many runs were queued again.
 */
export async function sweepOrphanedRuns(ctx: AppContext, scope: SweepScope): Promise<number> {
  return ctx.db.transaction(async (manager) => {
    const candidates = await lockCandidates(manager, scope.workerId, ctx.config.runHeartbeatStaleSeconds);
    const inHand = new Set(scope.ownJobIds());
    let requeued = 0;
    for (const orphan of candidates.filter((c) => c.abandoned || !(c.job_id && inHand.has(c.job_id)))) {
      if (orphan.attempts > ctx.config.runRetryLimit && orphan.job_id) {
        await announceEnding(ctx, manager, orphan.id, await deadLetterRun(manager, orphan.id, orphan.job_id));
        await dropRunJob(ctx, manager, orphan.job_id);
        continue;
      }
      const place = await placeInQueue(manager, null);
      if (!(await requeueRun(manager, { runId: orphan.id, attempt: orphan.attempts }, place))) continue;
      await sendRunJob(ctx, manager, { id: orphan.id, timeLimitSeconds: orphan.time_limit_seconds }, place);
      if (orphan.job_id) await dropRunJob(ctx, manager, orphan.job_id);
      requeued++;
    }
    if (requeued) ctx.log.info({ requeued }, 'orphaned runs queued again');
    return requeued;
  });
}

/** Sweeps now and every RUN_ORPHAN_SWEEP_SECONDS until stopped; any worker's sweep serves all workers. */
export function startOrphanSweep(ctx: AppContext, scope: SweepScope): { stop(): Promise<void> } {
  let running: Promise<unknown> | null = null;
  const sweep = () => {
    if (running) return;
    running = sweepOrphanedRuns(ctx, scope)
      .catch((err) => ctx.log.warn({ err }, 'orphan sweep failed'))
      .finally(() => (running = null));
  };
  sweep();
  const timer = setInterval(sweep, ctx.config.runOrphanSweepSeconds * 1000);
  return {
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}
