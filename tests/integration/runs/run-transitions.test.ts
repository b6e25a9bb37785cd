// The run state machine, transition by transition, on a real database and with no worker: each
// transition takes effect from exactly the states RUN_TRANSITIONS names (and, once a worker holds
// the run, only for the attempt that holds it; a claim only for the run's current job), so races
// between workers, stale jobs, requeues, cancels and dead letters can never end a run twice.
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RUN_STATUSES, type RunResult, type RunStatus } from '@gridwright/shared/run-result';
import { placeInQueue } from '../../../api/src/runs/queue';
import { RUN_TRANSITIONS, type TransitionName } from '../../../api/src/runs/states';
import {
  cancelQueuedRun,
  cancelRunningRun,
  claimRun,
  deadLetterRun,
  failRun,
  finishRun,
  recordProgress,
  requestCancel,
  requeueRun,
  type AttemptReport,
  type ClaimedRun,
} from '../../../api/src/runs/transitions';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, smallSpec } from './run-helpers';

const REPORT: AttemptReport = { log: 'solver log\n', solverSeconds: 1.5, progress: { windowsDone: 1, windowsTotal: 1 } };

/** A result as the engine returns it, reduced to what the transitions store and read. */
function engineResult(outcome: RunResult['outcome'], warnings: RunResult['warnings'] = []): RunResult {
  return { status: 'succeeded', outcome, objective: { value: 12.5, bound: 12.5, gap: 0 }, kpis: null, schedule: null, model: {} as RunResult['model'], warnings };
}

interface RunRow {
  status: RunStatus;
  attempts: number;
  worker_id: string | null;
  job_id: string;
  queue_round: number;
  heartbeat_at: Date | null;
  finished_at: Date | null;
  cancel_requested_at: Date | null;
  windows_done: number;
  windows_total: number | null;
  outcome: string | null;
  error: { code: string; message: string } | null;
  solver_log: string;
}

describe('run transitions', () => {
  let t: TestApp;
  let key: string;
  let tenantId: string;
  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    ({ apiKey: key, tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  const submit = async (name: string): Promise<string> => (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name })).expect(202)).body.id;
  const row = async (id: string): Promise<RunRow> => (await t.ctx.db.query('SELECT * FROM runs WHERE id = $1', [id]))[0];
  const holding = (runId: string, attempt: number): ClaimedRun => ({ runId, tenantId, attempt, spec: {}, steps: 8, units: 1, timeLimitSeconds: 20, cancelRequested: false });
  const claim = async (id: string, workerId: string) => claimRun(t.ctx.db, id, (await row(id)).job_id, workerId);

  // Each transition on a run put in each state in turn (held by attempt 1 where a worker holds it).
  const attempts: Record<TransitionName, (id: string) => Promise<boolean>> = {
    claim: async (id) => (await claim(id, 'table-worker')) !== null,
    requeue: async (id) => requeueRun(t.ctx.db, { runId: id, attempt: 1 }, await placeInQueue(t.ctx.db, null)),
    recordProgress: async (id) => (await recordProgress(t.ctx.db, holding(id, 1), null)) !== 'superseded',
    requestCancel: (id) => requestCancel(t.ctx.db, id),
    finish: async (id) => (await finishRun(t.ctx.db, holding(id, 1), engineResult('optimal'), REPORT)) !== null,
    fail: async (id) => (await failRun(t.ctx.db, holding(id, 1), { code: 'solver-error', message: 'thread ended' }, REPORT)) !== null,
    cancelRunning: async (id) => (await cancelRunningRun(t.ctx.db, holding(id, 1), 'stopped', REPORT)) !== null,
    cancelQueued: async (id) => (await cancelQueuedRun(t.ctx.db, id)) !== null,
    deadLetter: async (id) => (await deadLetterRun(t.ctx.db, id, (await row(id)).job_id)) !== null,
  };

  it('applies each transition from exactly the states RUN_TRANSITIONS names, and lands in one of its targets', async () => {
    const id = await submit('table');
    for (const name of Object.keys(RUN_TRANSITIONS) as TransitionName[]) {
      const { from, to } = RUN_TRANSITIONS[name];
      for (const status of RUN_STATUSES) {
        await t.ctx.db.query('UPDATE runs SET status = $2, attempts = 1, cancel_requested_at = NULL, finished_at = NULL WHERE id = $1', [id, status]);
        const applied = await attempts[name](id);
        const after = (await row(id)).status;
        expect(applied, `${name} from ${status}`).toBe((from as readonly RunStatus[]).includes(status));
        expect(applied ? [to].flat() : [status], `${name} from ${status} ends ${after}`).toContain(after);
      }
    }
  });

  it('claims a queued run once, and only through its current job; queued again, the superseded attempt can neither write progress nor finish', async () => {
    const id = await submit('superseded');
    const queued = await row(id);
    expect(await claimRun(t.ctx.db, id, randomUUID(), 'worker-a')).toBeNull();
    const first = await claimRun(t.ctx.db, id, queued.job_id, 'worker-a');
    expect(first).toMatchObject({ runId: id, tenantId, attempt: 1, timeLimitSeconds: 20, cancelRequested: false });
    expect((await row(id)).heartbeat_at).not.toBeNull();
    expect(await claimRun(t.ctx.db, id, queued.job_id, 'worker-b')).toBeNull();
    expect(await recordProgress(t.ctx.db, first!, { windowsDone: 1, windowsTotal: 4 })).toBe('continue');

    // Its worker is lost: the run goes back to the queue under a new job; the old job can no longer start it.
    const place = await placeInQueue(t.ctx.db, null);
    expect(await requeueRun(t.ctx.db, { runId: id, attempt: 2 }, place)).toBe(false);
    expect(await requeueRun(t.ctx.db, { runId: id, attempt: 1 }, place)).toBe(true);
    expect(await row(id)).toMatchObject({ status: 'queued', attempts: 1, worker_id: null, heartbeat_at: null, job_id: place.jobId });
    expect(await claimRun(t.ctx.db, id, queued.job_id, 'worker-b')).toBeNull();
    const retry = await claimRun(t.ctx.db, id, place.jobId, 'worker-b');
    expect(retry).toMatchObject({ attempt: 2 });
    expect(await row(id)).toMatchObject({ status: 'running', attempts: 2, worker_id: 'worker-b', windows_done: 0, windows_total: 4 });

    expect(await recordProgress(t.ctx.db, first!, { windowsDone: 3, windowsTotal: 4 })).toBe('superseded');
    expect(await finishRun(t.ctx.db, first!, engineResult('optimal'), REPORT)).toBeNull();
    expect(await failRun(t.ctx.db, first!, { code: 'solver-error', message: 'late' }, REPORT)).toBeNull();
    expect(await requeueRun(t.ctx.db, { runId: id, attempt: 1 }, await placeInQueue(t.ctx.db, null))).toBe(false);
    expect(await row(id)).toMatchObject({ status: 'running', windows_done: 0, finished_at: null });

    const ended = await finishRun(t.ctx.db, retry!, engineResult('optimal'), REPORT);
    expect(ended).toMatchObject({ status: 'succeeded' });
    const finished = await row(id);
    expect(finished).toMatchObject({ status: 'succeeded', outcome: 'optimal', error: null, solver_log: 'solver log\n', windows_done: 1, windows_total: 1 });
    // Never finished twice: the same attempt's second ending changes nothing.
    expect(await finishRun(t.ctx.db, retry!, engineResult('feasible'), REPORT)).toBeNull();
    expect((await row(id)).finished_at).toEqual(finished.finished_at);
  });

  it('finishes an infeasible answer failed, keeping the outcome and the diagnosis', async () => {
    const id = await submit('infeasible');
    const claimed = (await claim(id, 'worker-a'))!;
    const ended = await finishRun(t.ctx.db, claimed, engineResult('infeasible', [{ code: 'load-exceeds-supply', message: 'Site load exceeds supply at step 3.' }]), REPORT);
    expect(ended).toMatchObject({ status: 'failed' });
    expect(await row(id)).toMatchObject({
      status: 'failed',
      outcome: 'infeasible',
      error: { code: 'infeasible', message: 'No schedule satisfies the spec. Site load exceeds supply at step 3.' },
    });
  });

  it('cancels a queued run at once, so no worker can claim it', async () => {
    const id = await submit('cancel queued');
    expect(await requestCancel(t.ctx.db, id)).toBe(false);
    const { job_id: jobId } = await row(id);
    expect(await cancelQueuedRun(t.ctx.db, id)).toMatchObject({ status: 'cancelled', jobId });
    const cancelled = await row(id);
    expect(cancelled).toMatchObject({ status: 'cancelled', attempts: 0, error: { code: 'cancelled', message: 'Cancelled before it started.' } });
    expect(cancelled.finished_at).not.toBeNull();
    expect(cancelled.cancel_requested_at).not.toBeNull();
    expect(await claimRun(t.ctx.db, id, jobId, 'worker-a')).toBeNull();
    expect(await cancelQueuedRun(t.ctx.db, id)).toBeNull();
  });

  it('only flags a running run; the attempt holding it sees the flag and ends it cancelled', async () => {
    const id = await submit('cancel running');
    const claimed = (await claim(id, 'worker-a'))!;
    expect(await cancelQueuedRun(t.ctx.db, id)).toBeNull();
    expect(await requestCancel(t.ctx.db, id)).toBe(true);
    const flagged = await row(id);
    expect(flagged.status).toBe('running');
    expect(flagged.cancel_requested_at).not.toBeNull();
    // A repeated request keeps the first request's time.
    expect(await requestCancel(t.ctx.db, id)).toBe(true);
    expect((await row(id)).cancel_requested_at).toEqual(flagged.cancel_requested_at);

    expect(await recordProgress(t.ctx.db, claimed, { windowsDone: 2, windowsTotal: 6 })).toBe('cancel');
    expect(await cancelRunningRun(t.ctx.db, claimed, 'Cancelled while solving; the solver was terminated.', { ...REPORT, progress: null })).toMatchObject({ status: 'cancelled' });
    expect(await row(id)).toMatchObject({ status: 'cancelled', windows_done: 2, windows_total: 6, error: { code: 'cancelled' } });
    expect(await requestCancel(t.ctx.db, id)).toBe(false);
  });

  it('dead-letters a live run: it ends failed (worker-lost) and the attempt holding it can no longer end it', async () => {
    const id = await submit('dead letter');
    const claimed = (await claim(id, 'worker-a'))!;
    const { job_id: jobId } = await row(id);
    // A job the run has left behind dies without effect.
    expect(await deadLetterRun(t.ctx.db, id, randomUUID())).toBeNull();
    expect(await deadLetterRun(t.ctx.db, id, jobId)).toMatchObject({ status: 'failed' });
    const dead = await row(id);
    expect(dead).toMatchObject({ status: 'failed', error: { code: 'worker-lost' } });
    expect(await recordProgress(t.ctx.db, claimed, null)).toBe('superseded');
    expect(await finishRun(t.ctx.db, claimed, engineResult('optimal'), REPORT)).toBeNull();
    expect(await deadLetterRun(t.ctx.db, id, jobId)).toBeNull();
    expect(await row(id)).toEqual(dead);
  });

  it('leaves a finished run alone when its job is dead-lettered late', async () => {
    const id = await submit('finished then dead');
    const claimed = (await claim(id, 'worker-a'))!;
    await finishRun(t.ctx.db, claimed, engineResult('optimal'), REPORT);
    expect(await deadLetterRun(t.ctx.db, id, (await row(id)).job_id)).toBeNull();
    expect(await row(id)).toMatchObject({ status: 'succeeded', error: null });
  });
});
