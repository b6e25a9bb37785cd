// The orphan sweep, driven directly on a real database with no worker taking jobs: which running
// runs it queues again and which it leaves alone. No clock decides anything here: a dead worker is
// one whose presence lock is not held, and a stale heartbeat is written into the row.
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { sweepOrphanedRuns } from '../../../api/src/runs/orphan-sweep';
import { claimRun } from '../../../api/src/runs/transitions';
import { WorkerPresence } from '../../../api/src/services/worker-presence';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, smallSpec } from './run-helpers';

interface Row {
  status: string;
  attempts: number;
  worker_id: string | null;
  job_id: string;
  queue_round: number;
  error: { code: string } | null;
}

describe('the orphan sweep', () => {
  let t: TestApp;
  let key: string;
  let live: WorkerPresence;
  const LIVE = 'sweep-test:live';
  const DEAD = 'sweep-test:gone';
  beforeAll(async () => {
    t = await startTestApp({ ...FAST_QUEUE_ENV, RUN_RETRY_LIMIT: '2', RUN_HEARTBEAT_STALE_SECONDS: '60' });
    key = (await createTenantWithKey(t.ctx)).apiKey;
    live = new WorkerPresence({ databaseUrl: t.databaseUrl, workerId: LIVE, log: t.ctx.log });
    await live.start();
  });
  afterAll(async () => {
    await live.stop();
    await t.close();
  });
  // Each case counts what one sweep does: it starts with no run queued or running.
  afterEach(async () => {
    await t.ctx.db.query(`UPDATE runs SET status = 'cancelled', finished_at = now() WHERE status IN ('queued', 'running')`);
  });

  const row = async (id: string): Promise<Row> => (await t.ctx.db.query('SELECT status, attempts, worker_id, job_id, queue_round, error FROM runs WHERE id = $1', [id]))[0];
  const jobState = async (jobId: string): Promise<string> => (await t.ctx.db.query(`SELECT state FROM pgboss.job WHERE name = 'run-solve' AND id = $1`, [jobId]))[0].state;
  /** A run claimed by `workerId`, as a worker would have claimed it. */
  async function held(workerId: string, name: string): Promise<{ id: string; jobId: string }> {
    const id = (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name })).expect(202)).body.id;
    const { job_id: jobId } = await row(id);
    expect(await claimRun(t.ctx.db, id, jobId, workerId)).not.toBeNull();
    return { id, jobId };
  }
  const sweepAs = (workerId: string, ownJobIds: string[] = []) => sweepOrphanedRuns(t.ctx, { workerId, ownJobIds: () => ownJobIds });

  it("queues a dead worker's run again under a new job at the front of the queue, and leaves a live worker's run alone", async () => {
    const alive = await held(LIVE, 'held by a live worker');
    const orphan = await held(DEAD, 'held by a gone worker');
    const waiting = (await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'queued behind' })).expect(202)).body.id;

    // Swept by some other worker: the live worker's run is in hand, the gone worker's is not.
    expect(await sweepAs('sweep-test:other')).toBe(1);
    expect(await row(alive.id)).toMatchObject({ status: 'running', worker_id: LIVE, job_id: alive.jobId });
    const requeued = await row(orphan.id);
    expect(requeued).toMatchObject({ status: 'queued', attempts: 1, worker_id: null });
    expect(requeued.job_id).not.toBe(orphan.jobId);
    // The front: the lowest round still queued (that of the run waiting behind it).
    expect(requeued.queue_round).toBe((await row(waiting)).queue_round);
    expect(await jobState(orphan.jobId)).toBe('cancelled');
    expect(await jobState(requeued.job_id)).toBe('created');
    // Only the new job can start it.
    expect(await claimRun(t.ctx.db, orphan.id, orphan.jobId, LIVE)).toBeNull();
    expect(await claimRun(t.ctx.db, orphan.id, requeued.job_id, LIVE)).toMatchObject({ attempt: 2 });
  });

  it('queues again a run its own live worker holds but no longer supervises, and not one whose job it has in hand', async () => {
    const run = await held(LIVE, 'claimed, attempt lost');
    expect(await sweepAs(LIVE, [run.jobId])).toBe(0);
    expect((await row(run.id)).status).toBe('running');
    expect(await sweepAs(LIVE, [])).toBe(1);
    expect(await row(run.id)).toMatchObject({ status: 'queued', attempts: 1 });
  });

  it("queues again a live worker's run whose heartbeat is older than RUN_HEARTBEAT_STALE_SECONDS", async () => {
    const run = await held(LIVE, 'frozen worker');
    await t.ctx.db.query(`UPDATE runs SET heartbeat_at = now() - interval '59 seconds' WHERE id = $1`, [run.id]);
    expect(await sweepAs('sweep-test:other')).toBe(0);
    await t.ctx.db.query(`UPDATE runs SET heartbeat_at = now() - interval '61 seconds' WHERE id = $1`, [run.id]);
    expect(await sweepAs('sweep-test:other')).toBe(1);
    expect((await row(run.id)).status).toBe('queued');
  });

  it('queues a run once when two workers sweep at the same time', async () => {
    const run = await held(DEAD, 'two sweepers');
    const [one, two] = await Promise.all([sweepAs('sweep-test:one'), sweepAs('sweep-test:two')]);
    expect(one + two).toBe(1);
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'run-solve' AND data->>'runId' = $1 AND state = 'created'`, [run.id]);
    expect(n).toBe(1);
  });

  it('ends a run failed (worker-lost) once its workers were lost more than RUN_RETRY_LIMIT times', async () => {
    const run = await held(DEAD, 'keeps losing workers');
    // RUN_RETRY_LIMIT is 2 here: attempts 1 and 2 are queued again, attempt 3 ends the run.
    for (let attempt = 1; attempt <= 2; attempt++) {
      expect(await sweepAs('sweep-test:other')).toBe(1);
      const { job_id: jobId } = await row(run.id);
      expect(await claimRun(t.ctx.db, run.id, jobId, DEAD)).toMatchObject({ attempt: attempt + 1 });
    }
    const { job_id: lastJob } = await row(run.id);
    expect(await sweepAs('sweep-test:other')).toBe(0);
    expect(await row(run.id)).toMatchObject({ status: 'failed', attempts: 3, error: { code: 'worker-lost' } });
    expect(await jobState(lastJob)).toBe('cancelled');
  });
});
