import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, slowSpec, smallSpec, waitForRun } from './run-helpers';
import { spawnWorker, type WorkerProcess } from './worker-process';

// The API runs in this process with no worker; the solving happens in separate worker processes.
// Nothing here depends on how fast the machine is: no run is ever taken from a live worker
// because it is slow, and a dead worker is recognised by its presence lock, not by a clock.
describe('worker processes sharing one database', () => {
  let t: TestApp;
  let key: string;
  let workers: WorkerProcess[] = [];
  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    key = (await createTenantWithKey(t.ctx)).apiKey;
  });
  afterAll(async () => {
    await Promise.all(workers.map((w) => w.stop()));
    await t.close();
  });

  async function until<T>(what: string, probe: () => Promise<T | undefined>, timeoutMs = 60_000): Promise<T> {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      const found = await probe();
      if (found !== undefined) return found;
      if (Date.now() > deadline) throw new Error(`${what}: not within ${timeoutMs} ms`);
      await new Promise((r) => setTimeout(r, 50));
    }
  }

  it('solve 30 runs, each exactly once, both taking a share', { timeout: 180_000 }, async () => {
    const ids: string[] = [];
    for (let i = 0; i < 30; i++) {
      const supply = smallSpec().supply.availableKw.map((v) => v + i);
      ids.push((await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: `share-${i}`, supply: { availableKw: supply } })).expect(202)).body.id);
    }
    // Hold every run's row while the workers start: each takes one job (one slot each) and waits in
    // its claim, so both have claimed a run before either can take a second.
    await t.ctx.db.transaction(async (manager) => {
      await manager.query('SELECT id FROM runs WHERE id = ANY($1::uuid[]) FOR UPDATE', [ids]);
      workers = await Promise.all([spawnWorker(t.databaseUrl, FAST_QUEUE_ENV), spawnWorker(t.databaseUrl, FAST_QUEUE_ENV)]);
      await until('both workers waiting in a claim', async () => {
        const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'run-solve' AND state = 'active'`);
        return n === 2 ? true : undefined;
      });
    });
    for (const id of ids) expect((await waitForRun(t.app, key, id, undefined, 120_000)).status).toBe('succeeded');
    // A job is completed last, after its run's ending and usage are written.
    const jobs = await until('every run job settled', async () => {
      const found: { id: string; state: string }[] = await t.ctx.db.query(`SELECT id, state FROM pgboss.job WHERE name = 'run-solve' AND data->>'runId' = ANY($1::text[])`, [ids]);
      return found.every((j) => j.state !== 'active' && j.state !== 'created' && j.state !== 'retry') ? found : undefined;
    });
    const rows: { attempts: number; worker_id: string; job_id: string }[] = await t.ctx.db.query('SELECT attempts, worker_id, job_id FROM runs WHERE id = ANY($1::uuid[])', [ids]);
    expect(rows.map((r) => r.attempts)).toEqual(new Array(30).fill(1));
    expect(new Set(rows.map((r) => r.worker_id))).toEqual(new Set(workers.map((w) => w.workerId)));
    // One job per run, never replaced, and it is the job that started the run.
    expect(jobs).toHaveLength(30);
    expect(new Set(jobs.map((j) => j.id))).toEqual(new Set(rows.map((r) => r.job_id)));
    expect(jobs.map((j) => j.state)).toEqual(new Array(30).fill('completed'));
    const [{ n: usage }] = await t.ctx.db.query('SELECT count(*)::int AS n FROM run_usage WHERE run_id = ANY($1::uuid[])', [ids]);
    expect(usage).toBe(30);
  });

  it('queues the run of a SIGKILLed worker again at once; the other worker solves it, nothing is lost', { timeout: 180_000 }, async () => {
    // About 12 windows, several seconds: the kill lands mid-solve.
    const slow = await request(t.app).post('/v1/runs').set(bearer(key)).send(slowSpec(2)).expect(202);
    const running = await waitForRun(t.app, key, slow.body.id, (r) => r.status === 'running' && r.progress.windowsDone >= 1, 60_000);
    const [{ worker_id: holder, job_id: firstJob }] = await t.ctx.db.query('SELECT worker_id, job_id FROM runs WHERE id = $1', [slow.body.id]);
    const victim = workers.find((w) => w.workerId === holder)!;
    expect(victim).toBeDefined();
    victim.child.kill('SIGKILL');
    await new Promise((r) => victim.child.once('exit', r));
    expect(running.attempts).toBe(1);

    const others = await Promise.all([1, 2, 3].map((i) => request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: `after-kill-${i}` })).expect(202)));
    const done = await waitForRun(t.app, key, slow.body.id, undefined, 120_000);
    expect(done.status).toBe('succeeded');
    expect(done.attempts).toBe(2);
    const [{ worker_id: finisher, job_id: secondJob }] = await t.ctx.db.query('SELECT worker_id, job_id FROM runs WHERE id = $1', [slow.body.id]);
    expect(finisher).not.toBe(holder);
    expect(secondJob).not.toBe(firstJob);
    // The dead worker's job left the queue when the run was queued again under a new one, which
    // is completed last, after the run's ending and usage.
    const jobs = await until('the second job settled', async () => {
      const found: { id: string; state: string }[] = await t.ctx.db.query(`SELECT id, state FROM pgboss.job WHERE name = 'run-solve' AND data->>'runId' = $1`, [slow.body.id]);
      return found.some((j) => j.id === secondJob && j.state !== 'active') ? found : undefined;
    });
    expect(Object.fromEntries(jobs.map((j) => [j.id, j.state]))).toEqual({ [firstJob]: 'cancelled', [secondJob]: 'completed' });
    for (const o of others) expect((await waitForRun(t.app, key, o.body.id, undefined, 60_000)).status).toBe('succeeded');
    const [{ n: usage }] = await t.ctx.db.query('SELECT count(*)::int AS n FROM run_usage WHERE run_id = $1', [slow.body.id]);
    expect(usage).toBe(1);
  });
});
