import type { SiteSolution } from '../engine/solve-site';
import type { EntityManager } from 'typeorm';
import type { QueuePlace } from './queue';
import { fromStates, RUN_TRANSITIONS, type FinishedStatus } from './states';

// The `runs` row, not the queue job, is the state machine the API reads. Every change of it is one
// conditional UPDATE below: it takes effect only from the states (and, once a worker holds the run,
// the attempt) it names, and says whether it did, so two parties racing for one run can never both
// win. Ending a run queues its webhook event in the same transaction (`events.ts`); the callers own
// that transaction and everything else around the row (the queue, usage, the solver).

/** A DataSource or a transaction's EntityManager. */
export type RunDb = Pick<EntityManager, 'query'>;

export interface RunError {
  code: string;
  message: string;
}

export interface Progress {
  windowsDone: number;
  windowsTotal: number;
}

/** What a worker holds once it has claimed or taken over a run. */
export interface ClaimedRun {
  runId: string;
  tenantId: string;
  /** The attempt this worker owns; every later write of its is conditional on it. */
  attempt: number;
  spec: unknown;
  steps: number;
  units: number;
  timeLimitSeconds: number;
  cancelRequested: boolean;
}

/** What an attempt leaves on the row besides its state. */
export interface AttemptReport {
  log: string;
  solverSeconds: number;
  /** The solve's last progress report: a run quicker than the progress writes would otherwise end with none. */
  progress: Progress | null;
}

export interface EndedRun {
  status: FinishedStatus;
  finishedAt: Date;
}

/** Answer of `recordProgress`: what the attempt is to do next. */
export type WatchVerdict = 'continue' | 'cancel' | 'superseded';

/** TypeORM answers an UPDATE … RETURNING with `[rows, affected]`. */
async function update<T>(db: RunDb, sql: string, params: unknown[]): Promise<T[]> {
  const [rows] = await db.query(sql, params);
  return rows;
}

interface ClaimedRow {
  tenant_id: string;
  attempts: number;
  spec: unknown;
  steps: number;
  units: number;
  time_limit_seconds: number;
  cancel_requested_at: Date | null;
}

/**
 * queued → running under the next attempt number, for the run's current job only. Null when the
 * run is not queued (cancelled before it started, finished, or held by a worker) or when `jobId` is
 * not its current job (a job left over from before the run was queued again): such a job has
 * nothing to do.
 */
export async function claimRun(db: RunDb, runId: string, jobId: string, workerId: string): Promise<ClaimedRun | null> {
  const [row] = await update<ClaimedRow>(
    db,
    `UPDATE runs SET status = $4, started_at = now(), heartbeat_at = now(), attempts = attempts + 1, worker_id = $3, windows_done = 0
      WHERE id = $1 AND job_id = $2 AND status = ANY($5::text[])
      RETURNING tenant_id, attempts, spec, steps, units, time_limit_seconds, cancel_requested_at`,
    [runId, jobId, workerId, RUN_TRANSITIONS.claim.to, fromStates('claim')],
  );
  if (!row) return null;
  return {
    runId,
    tenantId: row.tenant_id,
    attempt: row.attempts,
    spec: row.spec,
    steps: row.steps,
    units: row.units,
    timeLimitSeconds: row.time_limit_seconds,
    cancelRequested: row.cancel_requested_at !== null,
  };
}

/**
 * running (under `attempt`) → queued, with a new job and round (`placeInQueue`): the attempt's
 * worker is gone or its attempt ended without an ending (`runs/orphan-sweep.ts` decides). The
 * attempt count stays, so the next claim is the next attempt; should the old attempt still be
 * alive, its next `recordProgress` answers `superseded` and none of its endings take effect.
 * False when the run is no longer running under that attempt.
 */
export async function requeueRun(db: RunDb, held: { runId: string; attempt: number }, place: QueuePlace): Promise<boolean> {
  const rows = await update(
    db,
    `UPDATE runs SET status = $3, worker_id = NULL, heartbeat_at = NULL, job_id = $4, queue_round = $5
      WHERE id = $1 AND attempts = $2 AND status = ANY($6::text[]) RETURNING id`,
    [held.runId, held.attempt, RUN_TRANSITIONS.requeue.to, place.jobId, place.round, fromStates('requeue')],
  );
  return rows.length > 0;
}

/**
 * The attempt's heartbeat: writes its progress (null: nothing new) and the time, and reads, in the
 * same statement, whether the attempt is to go on. Applies to a running run under `attempt`; on
 * any other row nothing is written and the answer is `superseded`, so an attempt whose run was
 * queued again yields.
 */
export async function recordProgress(db: RunDb, claimed: ClaimedRun, progress: Progress | null): Promise<WatchVerdict> {
  const [row] = await update<{ cancel_requested_at: Date | null }>(
    db,
    `UPDATE runs SET windows_done = coalesce($3, windows_done), windows_total = coalesce($4, windows_total), heartbeat_at = now()
      WHERE id = $1 AND attempts = $2 AND status = ANY($5::text[]) RETURNING cancel_requested_at`,
    [claimed.runId, claimed.attempt, progress?.windowsDone ?? null, progress?.windowsTotal ?? null, fromStates('recordProgress')],
  );
  if (!row) return 'superseded';
  return row.cancel_requested_at ? 'cancel' : 'continue';
}

async function endAttempt(
  db: RunDb,
  claimed: ClaimedRun,
  transition: 'finish' | 'fail' | 'cancelRunning',
  status: FinishedStatus,
  result: SiteSolution | null,
  error: RunError | null,
  report: AttemptReport,
): Promise<EndedRun | null> {
  const { progress } = report;
  const [row] = await update<{ finished_at: Date }>(
    db,
    `UPDATE runs SET status = $3, outcome = $4, result = $5, error = $6, solver_log = $7, solver_seconds = $8, finished_at = now(),
            windows_total = coalesce($10, windows_total),
            windows_done = CASE WHEN $11 THEN coalesce($10, windows_total, windows_done) ELSE coalesce($9, windows_done) END
      WHERE id = $1 AND attempts = $2 AND status = ANY($12::text[]) RETURNING finished_at`,
    [
      claimed.runId,
      claimed.attempt,
      status,
      result?.outcome ?? null,
      result ? JSON.stringify({ ...result, status }) : null,
      error ? JSON.stringify(error) : null,
      report.log,
      report.solverSeconds,
      progress?.windowsDone ?? null,
      progress?.windowsTotal ?? null,
      status === 'succeeded',
      fromStates(transition),
    ],
  );
  return row ? { status, finishedAt: row.finished_at } : null;
}

/**
 * running (under `attempt`) → succeeded with the engine's schedule, or failed with its result and
 * diagnosis when the spec is infeasible or no schedule was found in time. Null when the attempt was
 * superseded or the run already ended: a run is never finished twice.
 */
export function finishRun(db: RunDb, claimed: ClaimedRun, result: SiteSolution, report: AttemptReport): Promise<EndedRun | null> {
  if (result.outcome === 'optimal' || result.outcome === 'feasible') return endAttempt(db, claimed, 'finish', 'succeeded', result, null, report);
  const diagnosis = result.warnings.map((w) => w.message).join(' ');
  const message =
    result.outcome === 'infeasible'
      ? `No schedule satisfies the spec. ${diagnosis}`.trim()
      : `The time limit was reached before any feasible schedule was found. ${diagnosis}`.trim();
  return endAttempt(db, claimed, 'finish', 'failed', result, { code: result.outcome, message }, report);
}

/**
 * running (under `attempt`) → failed without a result: the stored spec no longer validates, the
 * solver crashed, or the watchdog stopped it. Null when the attempt was superseded or the run ended.
 */
export function failRun(db: RunDb, claimed: ClaimedRun, error: RunError, report: AttemptReport): Promise<EndedRun | null> {
  return endAttempt(db, claimed, 'fail', RUN_TRANSITIONS.fail.to, null, error, report);
}

/**
 * running (under `attempt`) → cancelled, once the worker has seen the cancel flag and stopped the
 * solver. Null when the attempt was superseded or the run ended.
 */
export function cancelRunningRun(db: RunDb, claimed: ClaimedRun, message: string, report: AttemptReport): Promise<EndedRun | null> {
  return endAttempt(db, claimed, 'cancelRunning', RUN_TRANSITIONS.cancelRunning.to, null, { code: 'cancelled', message }, report);
}

/**
 * queued → cancelled at once. Null when the run is not queued. The answer names the run's job,
 * which can no longer start it, so the caller can take it out of the queue.
 */
export async function cancelQueuedRun(db: RunDb, runId: string): Promise<(EndedRun & { jobId: string | null }) | null> {
  const status = RUN_TRANSITIONS.cancelQueued.to;
  const [row] = await update<{ finished_at: Date; job_id: string | null }>(
    db,
    `UPDATE runs SET status = $2, cancel_requested_at = now(), finished_at = now(), error = $3
      WHERE id = $1 AND status = ANY($4::text[]) RETURNING finished_at, job_id`,
    [runId, status, JSON.stringify({ code: 'cancelled', message: 'Cancelled before it started.' }), fromStates('cancelQueued')],
  );
  return row ? { status, finishedAt: row.finished_at, jobId: row.job_id } : null;
}

/**
 * Flags a running run for cancelling; the run stays running until the worker holding it sees the
 * flag (`recordProgress`) and ends it with `cancelRunningRun`. A repeated request keeps the first
 * request's time. False when the run is not running.
 */
export async function requestCancel(db: RunDb, runId: string): Promise<boolean> {
  const rows = await update(
    db,
    `UPDATE runs SET cancel_requested_at = coalesce(cancel_requested_at, now()) WHERE id = $1 AND status = ANY($2::text[]) RETURNING id`,
    [runId, fromStates('requestCancel')],
  );
  return rows.length > 0;
}

/**
 * queued | running → failed (`worker-lost`), for the run's current job only: the run's workers were
 * lost more often than RUN_RETRY_LIMIT allows, or pg-boss dead-lettered the job after its handler
 * kept failing. Whatever attempt holds the run can no longer end it. Null when the run had already
 * ended or `jobId` is a job the run has left behind, so a stale or second dead letter changes nothing.
 */
export async function deadLetterRun(db: RunDb, runId: string, jobId: string): Promise<EndedRun | null> {
  const status = RUN_TRANSITIONS.deadLetter.to;
  const [row] = await update<{ finished_at: Date }>(
    db,
    `UPDATE runs SET status = $2, finished_at = now(), error = $3
      WHERE id = $1 AND job_id = $5 AND status = ANY($4::text[]) RETURNING finished_at`,
    [
      runId,
      status,
      JSON.stringify({ code: 'worker-lost', message: 'The workers solving this run stopped responding too many times.' }),
      fromStates('deadLetter'),
      jobId,
    ],
  );
  return row ? { status, finishedAt: row.finished_at } : null;
}
