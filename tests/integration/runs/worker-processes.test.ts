import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, slowSpec, smallSpec, waitForRun } from './run-helpers';
import { spawnWorker, type WorkerProcess } from './worker-process';

// The API runs in this process with no worker; the solving happens in separate worker processes.
const QUEUE_ENV = { ...FAST_QUEUE_ENV, RUN_EXPIRY_GRACE_SECONDS: '2' };

// Both tests share the two worker processes: first they share 30 runs, then one is killed mid-solve.
describe('worker processes sharing one database', () => {
  let t: TestApp;
  let key: string;
  let workers: WorkerProcess[] = [];
  beforeAll(async () => {
    t = await startTestApp(QUEUE_ENV);
    key = (await createTenantWithKey(t.ctx)).apiKey;
    workers = await Promise.all([spawnWorker(t.databaseUrl, QUEUE_ENV), spawnWorker(t.databaseUrl, QUEUE_ENV)]);
  });
  afterAll(async () => {
    await Promise.all(workers.map((w) => w.stop()));
    await t.close();
  });

  it('solve 30 runs, each exactly once, both taking a share', { timeout: 120_000 }, async () => {
    const ids: string[] = [];
    for (let i = 0; i < 30; i++) {
      const supply = smallSpec().supply.availableKw.map((v) => v + i);
      ids.push((await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: `share-${i}`, supply: { availableKw: supply } })).expect(202)).body.id);
    }
    for (const id of ids) expect((await waitForRun(t.app, key, id, undefined, 90_000)).status).toBe('succeeded');
    const rows: { attempts: number; worker_id: string }[] = await t.ctx.db.query('SELECT attempts, worker_id FROM runs WHERE id = ANY($1::uuid[])', [ids]);
    expect(rows.map((r) => r.attempts)).toEqual(new Array(30).fill(1));
    expect(new Set(rows.map((r) => r.worker_id))).toEqual(new Set(workers.map((w) => w.workerId)));
    const jobs: { state: string; retry_count: number }[] = await t.ctx.db.query(`SELECT state, retry_count FROM pgboss.job WHERE name = 'run-solve' AND data->>'runId' = ANY($1::text[])`, [ids]);
    expect(jobs).toHaveLength(30);
    expect(jobs.every((j) => j.state === 'completed' && j.retry_count === 0)).toBe(true);
  });

  it('has its run retried by pg-boss after the job expires, solved once more and succeeded; nothing is lost', { timeout: 90_000 }, async () => {
    // About 12 windows, several seconds: the kill lands mid-solve. Expiry = the run's time limit
    // (12 s) + RUN_EXPIRY_GRACE_SECONDS (2 s).
    const slow = await request(t.app).post('/v1/runs').set(bearer(key)).send({ ...slowSpec(2), solver: { ...slowSpec(2).solver, timeLimitSeconds: 12 } }).expect(202);
    const running = await waitForRun(t.app, key, slow.body.id, (r) => r.status === 'running' && r.progress.windowsDone >= 1);
    const [{ worker_id: holder }] = await t.ctx.db.query('SELECT worker_id FROM runs WHERE id = $1', [slow.body.id]);
    const victim = workers.find((w) => w.workerId === holder)!;
    expect(victim).toBeDefined();
    victim.child.kill('SIGKILL');
    await new Promise((r) => victim.child.once('exit', r));
    expect(running.attempts).toBe(1);

    const others = await Promise.all([1, 2, 3].map((i) => request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: `after-kill-${i}` })).expect(202)));
    const done = await waitForRun(t.app, key, slow.body.id, undefined, 60_000);
    expect(done.status).toBe('succeeded');
    expect(done.attempts).toBe(2);
    const [{ worker_id: finisher }] = await t.ctx.db.query('SELECT worker_id FROM runs WHERE id = $1', [slow.body.id]);
    expect(finisher).not.toBe(holder);
    for (const o of others) expect((await waitForRun(t.app, key, o.body.id)).status).toBe('succeeded');
  });
});
