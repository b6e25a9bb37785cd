import { randomUUID } from 'node:crypto';
import os from 'node:os';
import type PgBoss from 'pg-boss';
import type { RunResult } from '@gridwright/shared/run-result';
import type { AppContext } from '../context';
import { solveSite } from '../engine/solve-site';
import { SolverPool } from '../engine/solver-pool';
import { recordRunUsage } from './quotas';
import { RUN_DEAD_QUEUE, RUN_QUEUE, startQueue, type RunJobData } from './run-queue';
import { resolveSiteSpecForTenant } from './resolve-site-spec';
import { enqueueRunEvent } from './webhooks';

export type SolveFn = typeof solveSite;

/** The solver log kept with a run is capped so a chatty rolling solve cannot bloat the row. */
const MAX_LOG_CHARS = 256 * 1024;

interface Claimed {
  tenantId: string;
  attempt: number;
  spec: unknown;
  steps: number;
  units: number;
  timeLimitSeconds: number;
  cancelRequested: boolean;
}

type Ending =
  | { status: 'succeeded' | 'failed'; result: RunResult; error: { code: string; message: string } | null }
  | { status: 'failed'; result: null; error: { code: string; message: string } }
  | { status: 'cancelled'; result: null; error: { code: string; message: string } };

/**
 * Solves one run for a queue job. The run row, not the job, is the state machine: the claim and
 * the final transition are conditional UPDATEs on (status, attempts), so a run a crashed worker
 * held is taken over by the retry, and a superseded attempt can never finish it a second time.
 * Only crashes (the process dies, the database fails) make the job fail and be retried; every
 * outcome of the spec itself, good or bad, completes the job.
 */
export async function solveRunJob(ctx: AppContext, runId: string, workerId: string, solve: SolveFn = solveSite, solver?: SolverPool): Promise<void> {
  const claimed = await claimRun(ctx, runId, workerId);
  if (!claimed) return;
  if (claimed.cancelRequested) {
    await finishRun(ctx, runId, claimed, { status: 'cancelled', result: null, error: { code: 'cancelled', message: 'Cancelled while a worker held it.' } }, '', 0);
    return;
  }

  const started = Date.now();
  let log = '';
  const onLog = (line: string) => {
    if (log.length < MAX_LOG_CHARS) log += line.endsWith('\n') ? line : `${line}\n`;
  };

  const resolution = await resolveSiteSpecForTenant(ctx.db.manager, claimed.tenantId, claimed.spec);
  if (!resolution.ok) {
    const message = `The stored spec no longer validates: ${resolution.errors.map((e) => `${e.pointer} ${e.message}`).join('; ')}`;
    await finishRun(ctx, runId, claimed, { status: 'failed', result: null, error: { code: 'invalid-spec', message } }, log, 0);
    return;
  }
  const { resolved } = resolution;

  const abort = new AbortController();
  let abortReason: 'cancelled' | 'superseded' | 'time-limit' | null = null;
  const stop = (reason: NonNullable<typeof abortReason>) => {
    if (abortReason) return;
    abortReason = reason;
    abort.abort(new Error(reason));
  };
  type Progress = { windowsDone: number; windowsTotal: number };
  let progress: Progress | null = null;
  let written: Progress | null = null;

  // One statement both writes progress and reads the cancel flag; a changed attempt number means
  // pg-boss gave the job to another worker (this one was presumed dead), so this attempt yields.
  const watch = async () => {
    const p = progress;
    const [rows]: [{ cancel_requested_at: Date | null; attempts: number; status: string }[], number] = await ctx.db.query(
      `UPDATE runs SET windows_done = coalesce($2, windows_done), windows_total = coalesce($3, windows_total)
        WHERE id = $1 RETURNING cancel_requested_at, attempts, status`,
      [runId, p && p !== written ? p.windowsDone : null, p && p !== written ? p.windowsTotal : null],
    );
    written = p;
    const row = rows[0];
    if (!row || row.attempts !== claimed.attempt || row.status !== 'running') stop('superseded');
    else if (row.cancel_requested_at) stop('cancelled');
  };
  const poll = setInterval(() => {
    watch().catch((err) => ctx.log.warn({ err, runId }, 'run watch failed'));
  }, ctx.config.runCancelPollMs);
  // The engine's time limit is soft (HiGHS overshoots); this is the hard stop, well before the
  // queue job expires and would be retried as if the worker had died.
  const hardLimitMs = (claimed.timeLimitSeconds + ctx.config.runExpiryGraceSeconds / 2) * 1000;
  const watchdog = setTimeout(() => stop('time-limit'), hardLimitMs);

  let ending: Ending;
  try {
    const result = await solve(resolved, {
      solver,
      signal: abort.signal,
      onLog,
      onProgress: (p: { windowsDone: number; windowsTotal: number }) => {
        progress = { windowsDone: p.windowsDone, windowsTotal: p.windowsTotal };
      },
    });
    ending = endingFor(result);
  } catch (err) {
    if (abortReason === 'superseded') {
      ctx.log.info({ runId, attempt: claimed.attempt }, 'attempt superseded by a retry; leaving the run to it');
      return;
    }
    if (abortReason === 'cancelled') ending = { status: 'cancelled', result: null, error: { code: 'cancelled', message: 'Cancelled while solving; the solver was terminated.' } };
    else if (abortReason === 'time-limit') {
      ending = { status: 'failed', result: null, error: { code: 'time-limit', message: `The solve exceeded its time limit of ${claimed.timeLimitSeconds} s and was terminated.` } };
    } else ending = { status: 'failed', result: null, error: { code: 'solver-error', message: (err as Error).message || String(err) } };
  } finally {
    clearInterval(poll);
    clearTimeout(watchdog);
  }
  await finishRun(ctx, runId, claimed, ending, log, (Date.now() - started) / 1000, progress);
}

function endingFor(result: RunResult): Ending {
  if (result.outcome === 'optimal' || result.outcome === 'feasible') return { status: 'succeeded', result, error: null };
  const diagnosis = result.warnings.map((w) => w.message).join(' ');
  const message =
    result.outcome === 'infeasible'
      ? `No schedule satisfies the spec. ${diagnosis}`.trim()
      : `The time limit was reached before any feasible schedule was found. ${diagnosis}`.trim();
  return { status: 'failed', result, error: { code: result.outcome, message } };
}

async function claimRun(ctx: AppContext, runId: string, workerId: string): Promise<Claimed | null> {
  const [rows] = await ctx.db.query(
    `UPDATE runs SET status = 'running', started_at = now(), attempts = attempts + 1, worker_id = $2, windows_done = 0
      WHERE id = $1 AND status IN ('queued', 'running')
      RETURNING tenant_id, attempts, spec, steps, units, time_limit_seconds, cancel_requested_at`,
    [runId, workerId],
  );
  const row = rows[0];
  if (!row) return null;
  return {
    tenantId: row.tenant_id,
    attempt: row.attempts,
    spec: row.spec,
    steps: row.steps,
    units: row.units,
    timeLimitSeconds: row.time_limit_seconds,
    cancelRequested: row.cancel_requested_at !== null,
  };
}

const EVENT_FOR = { succeeded: 'run.succeeded', failed: 'run.failed', cancelled: 'run.cancelled' } as const;

/**
 * The run's final row. `progress` is the solve's last report: a run quicker than the progress
 * poll would otherwise end with none written.
 */
async function finishRun(
  ctx: AppContext,
  runId: string,
  claimed: Claimed,
  ending: Ending,
  log: string,
  solverSeconds: number,
  progress: { windowsDone: number; windowsTotal: number } | null = null,
) {
  const finished = await ctx.db.transaction(async (manager) => {
    const [rows] = await manager.query(
      `UPDATE runs SET status = $3, outcome = $4, result = $5, error = $6, solver_log = $7, solver_seconds = $8, finished_at = now(),
              windows_total = coalesce($10, windows_total),
              windows_done = CASE WHEN $3 = 'succeeded' THEN coalesce($10, windows_total, windows_done) ELSE coalesce($9, windows_done) END
        WHERE id = $1 AND attempts = $2 AND status = 'running' RETURNING finished_at`,
      [
        runId,
        claimed.attempt,
        ending.status,
        ending.result?.outcome ?? null,
        ending.result ? JSON.stringify({ ...ending.result, status: ending.status }) : null,
        ending.error ? JSON.stringify(ending.error) : null,
        log,
        solverSeconds,
        progress?.windowsDone ?? null,
        progress?.windowsTotal ?? null,
      ],
    );
    if (!rows.length) return null;
    await enqueueRunEvent(ctx, manager, runId, EVENT_FOR[ending.status]);
    return rows[0].finished_at as Date;
  });
  if (!finished) return;
  await recordRunUsage(ctx, { tenantId: claimed.tenantId, runId, solverSeconds, steps: claimed.steps, units: claimed.units, endedAt: finished }).catch((err) =>
    ctx.log.error({ err, runId }, 'recording run usage failed'),
  );
}

/** A run whose job exhausted its retries (its workers kept dying) ends failed instead of hanging. */
export async function failDeadRun(ctx: AppContext, runId: string): Promise<void> {
  await ctx.db.transaction(async (manager) => {
    const [rows] = await manager.query(
      `UPDATE runs SET status = 'failed', finished_at = now(),
              error = '{"code":"worker-lost","message":"The workers solving this run stopped responding too many times."}'
        WHERE id = $1 AND status IN ('queued', 'running') RETURNING id`,
      [runId],
    );
    if (rows.length) await enqueueRunEvent(ctx, manager, runId, 'run.failed');
  });
}

export interface RunWorkerHandle {
  workerId: string;
  stop(): Promise<void>;
}

/** Subscribes `concurrency` pollers to the run queue (pg-boss 10 hands each poller one job at a time). */
export async function startRunWorker(ctx: AppContext, opts: { concurrency?: number; solve?: SolveFn } = {}): Promise<RunWorkerHandle> {
  const boss: PgBoss = await startQueue(ctx);
  const workerId = `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
  const concurrency = Math.max(1, opts.concurrency ?? ctx.config.workerConcurrency);
  // One pool for every run this process takes: runs at once share its threads, never more.
  // Once stopped, its threads are ended as they fall idle; a run still solving goes on.
  const solver = new SolverPool({ size: ctx.config.solverThreads });
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
          await solveRunJob(ctx, job.data.runId, workerId, opts.solve, solver);
        } finally {
          releaseIfStopped();
        }
      }),
    );
  }
  ids.push(
    await boss.work<RunJobData>(RUN_DEAD_QUEUE, workOptions, async ([job]) => {
      await failDeadRun(ctx, job.data.runId);
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
