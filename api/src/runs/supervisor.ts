import type { EntityManager } from 'typeorm';
import type { AppContext } from '../context';
import { Deadline, workerHardStop } from '../engine/deadline';
import { solveSite } from '../engine/solve-site';
import type { SolverPort } from '../engine/solver-port';
import { retryWhileDatabaseUnavailable } from '../lib/database-retry';
import { recordRunUsage } from '../services/quotas';
import { resolveSiteSpecForTenant } from '../services/resolve-site-spec';
import { announceEnding } from './events';
import {
  cancelRunningRun,
  claimRun,
  failRun,
  finishRun,
  recordProgress,
  type AttemptReport,
  type ClaimedRun,
  type EndedRun,
  type Progress,
  type RunError,
} from './transitions';

export type SolveFn = typeof solveSite;

/** The solver log kept with a run is capped so a chatty rolling solve cannot bloat the row. */
const MAX_LOG_CHARS = 256 * 1024;

export interface Supervision {
  /** Written into `runs.worker_id`: which process holds the run. */
  workerId: string;
  solve?: SolveFn;
  solver: SolverPort;
}

type StopReason = 'cancelled' | 'superseded' | 'time-limit';
type Ending = (manager: EntityManager, report: AttemptReport) => Promise<EndedRun | null>;

/** What an attempt that never reached the solver leaves on the row. */
const UNSOLVED: AttemptReport = { log: '', solverSeconds: 0, progress: null };

/**
 * Supervises one attempt at a run for its queue job: claims the run, watches it while the engine
 * solves (heartbeat and progress out, cancel flag and supersession in, a watchdog for the time
 * limit) and hands the ending to a transition. Every outcome of the spec itself, good or bad,
 * completes the job; a job that is not the run's current one finds nothing to claim. Should this
 * throw after the claim (the database failed under it), the run is left running under a worker
 * that no longer supervises it, and the orphan sweep queues it again.
 */
export async function superviseRun(ctx: AppContext, job: { runId: string; jobId: string }, { workerId, solve = solveSite, solver }: Supervision): Promise<void> {
  const { runId } = job;
  const claimed = await claimRun(ctx.db, runId, job.jobId, workerId);
  if (!claimed) return;
  // The run's time limit runs from its claim; every later clock derives from this (engine/deadline.ts).
  const deadline = Deadline.after(claimed.timeLimitSeconds);
  if (claimed.cancelRequested) {
    await conclude(ctx, claimed, UNSOLVED, (m, r) => cancelRunningRun(m, claimed, 'Cancelled while a worker held it.', r));
    return;
  }

  const started = Date.now();
  let log = '';
  const onLog = (line: string) => {
    if (log.length < MAX_LOG_CHARS) log += line.endsWith('\n') ? line : `${line}\n`;
  };
  let progress: Progress | null = null;

  const resolution = await resolveSiteSpecForTenant(ctx.db.manager, claimed.tenantId, claimed.spec);
  if (!resolution.ok) {
    const message = `The stored spec no longer validates: ${resolution.errors.map((e) => `${e.pointer} ${e.message}`).join('; ')}`;
    await conclude(ctx, claimed, UNSOLVED, (m, r) => failRun(m, claimed, { code: 'invalid-spec', message }, r));
    return;
  }
  const { resolved } = resolution;

  const abort = new AbortController();
  let stopReason: StopReason | null = null;
  const stop = (reason: StopReason) => {
    if (stopReason) return;
    stopReason = reason;
    abort.abort(new Error(reason));
  };
  let written: Progress | null = null;
  const watch = async () => {
    const p = progress;
    const verdict = await recordProgress(ctx.db, claimed, p !== written ? p : null);
    written = p;
    if (verdict === 'superseded') stop('superseded');
    else if (verdict === 'cancel') stop('cancelled');
  };
  const poll = setInterval(() => {
    watch().catch((err) => ctx.log.warn({ err, runId }, 'run watch failed'));
  }, ctx.config.runCancelPollMs);
  // HiGHS's own limit is soft; this hard stop comes well before the queue job expires.
  const hardStop = workerHardStop(deadline, ctx.config.runExpiryGraceSeconds);
  const watchdog = setTimeout(() => stop('time-limit'), hardStop.remainingSeconds() * 1000);

  let ending: Ending;
  try {
    const result = await solve(resolved, {
      solver,
      deadline,
      signal: abort.signal,
      onLog,
      onProgress: (p: Progress) => {
        progress = { windowsDone: p.windowsDone, windowsTotal: p.windowsTotal };
      },
    });
    ending = (m, r) => finishRun(m, claimed, result, r);
  } catch (err) {
    if (stopReason === 'superseded') {
      ctx.log.info({ runId, attempt: claimed.attempt }, 'attempt superseded (the run was queued again); leaving the run to its next attempt');
      return;
    }
    if (stopReason === 'cancelled') ending = (m, r) => cancelRunningRun(m, claimed, 'Cancelled while solving; the solver was terminated.', r);
    else ending = (m, r) => failRun(m, claimed, failureOf(err, stopReason, claimed), r);
  } finally {
    clearInterval(poll);
    clearTimeout(watchdog);
  }
  await conclude(ctx, claimed, { log, solverSeconds: (Date.now() - started) / 1000, progress }, ending);
}

function failureOf(err: unknown, stopReason: StopReason | null, claimed: ClaimedRun): RunError {
  if (stopReason === 'time-limit') {
    return { code: 'time-limit', message: `The solve exceeded its time limit of ${claimed.timeLimitSeconds} s and was terminated.` };
  }
  return { code: 'solver-error', message: (err as Error).message || String(err) };
}

/**
 * Applies the attempt's ending transition with its webhook event, then records the usage. A
 * superseded attempt's transition takes no effect, and then nothing else happens either. A result
 * is not thrown away for a database that is briefly unreachable: the ending is tried again until
 * the heartbeat would have gone stale, by which time the run has been queued again anyway.
 */
async function conclude(ctx: AppContext, claimed: ClaimedRun, report: AttemptReport, ending: Ending) {
  const giveUpAt = Date.now() + ctx.config.runHeartbeatStaleSeconds * 1000;
  const ended = await retryWhileDatabaseUnavailable(
    () =>
      ctx.db.transaction(async (manager) => {
        const outcome = await ending(manager, report);
        await announceEnding(ctx, manager, claimed.runId, outcome);
        return outcome;
      }),
    { log: ctx.log, what: 'ending a run', giveUp: () => Date.now() > giveUpAt },
  );
  if (!ended) return;
  const usage = { tenantId: claimed.tenantId, runId: claimed.runId, solverSeconds: report.solverSeconds, steps: claimed.steps, units: claimed.units, endedAt: ended.finishedAt };
  await recordRunUsage(ctx, usage).catch((err) => ctx.log.error({ err, runId: claimed.runId }, 'recording run usage failed'));
}
