import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startWorkers } from '../../../api/src/services/workers';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, slowSpec, smallSpec, waitForRun } from './run-helpers';

describe('cancelling runs', () => {
  let t: TestApp;
  let key: string;
  let workers: Awaited<ReturnType<typeof startWorkers>> | null = null;
  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    key = (await createTenantWithKey(t.ctx)).apiKey;
  });
  afterAll(async () => {
    await workers?.stop();
    await t.close();
  });

  it('a queued run never starts', async () => {
    const queued = await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'never' })).expect(202);
    const cancel = await request(t.app).post(`/v1/runs/${queued.body.id}/cancel`).set(bearer(key));
    expect(cancel.status).toBe(202);
    expect(cancel.body.status).toBe('cancelled');

    // Its job left the queue with it, so it takes no worker's turn.
    const [{ state }] = await t.ctx.db.query(`SELECT state FROM pgboss.job WHERE name = 'run-solve' AND data->>'runId' = $1`, [queued.body.id]);
    expect(state).toBe('cancelled');

    workers = await startWorkers(t.ctx, { concurrency: 1 });
    const later = await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'after' })).expect(202);
    expect((await waitForRun(t.app, key, later.body.id)).status).toBe('succeeded');
    const after = await request(t.app).get(`/v1/runs/${queued.body.id}`).set(bearer(key)).expect(200);
    expect(after.body).toMatchObject({ status: 'cancelled', attempts: 0, startedAt: null });

    const again = await request(t.app).post(`/v1/runs/${later.body.id}/cancel`).set(bearer(key));
    expect(again.status).toBe(409);
  });

  it('a running run has its solver terminated and ends cancelled', async () => {
    const res = await request(t.app).post('/v1/runs').set(bearer(key)).send(slowSpec(6)).expect(202);
    const running = await waitForRun(t.app, key, res.body.id, (r) => r.status === 'running' && r.progress.windowsDone >= 1);
    const total = running.progress.windowsTotal;
    expect(total).toBeGreaterThan(10);
    const cancel = await request(t.app).post(`/v1/runs/${res.body.id}/cancel`).set(bearer(key));
    expect(cancel.status).toBe(202);
    expect(cancel.body.cancelRequestedAt).toBeTruthy();
    const done = await waitForRun(t.app, key, res.body.id);
    expect(done.status).toBe('cancelled');
    expect(done.error.code).toBe('cancelled');
    expect(done.progress.windowsDone).toBeLessThan(total);
    expect(done.schedule).toBeUndefined();
  });
});
