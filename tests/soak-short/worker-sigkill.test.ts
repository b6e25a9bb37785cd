// Shortened fault test (the long one is `npm run test:soak`): a worker process is SIGKILLed while
// it solves; its run goes back to the queue as soon as the worker's presence ends, another worker
// solves it, and every run ends succeeded, each finished once.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { waitFor } from '../soak/lib/child-process';
import { newPool, startWorker, waitAllTerminal, type WorkerProcess } from '../soak/lib/harness';
import { busySiteSpec } from '../soak/lib/specs';
import { createTestDatabase } from '../support/database';
import { createTenantWithKey } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';

describe('a worker killed mid-solve (short)', () => {
  let db: Awaited<ReturnType<typeof createTestDatabase>>;
  let t: TestApp;
  const workers: WorkerProcess[] = [];
  beforeAll(async () => {
    db = await createTestDatabase();
    t = await startTestApp({ DATABASE_URL: db.url });
  });
  afterAll(async () => {
    await Promise.all(workers.map((w) => w.child.kill()));
    await t.close();
    await db.drop();
  });

  it('retries the interrupted run on another worker; all runs succeed, each once', async () => {
    const { apiKey } = await createTenantWithKey(t.ctx);
    const pool = newPool(db.url);
    try {
      workers.push(await startWorker(db.url, 1, 'short-worker-a'));
      const ids: string[] = [];
      for (let i = 0; i < 3; i++) {
        const res = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(busySiteSpec(`short crash ${i}`, 10));
        expect(res.status, res.text).toBe(202);
        ids.push(res.body.id);
      }
      const victim = workers[0];
      const held = await waitFor(
        'a run held by the worker',
        async () => {
          const { rows } = await pool.query(`SELECT id FROM runs WHERE worker_id = $1 AND status = 'running'`, [victim.workerId]);
          return rows[0]?.id as string | undefined;
        },
        30_000,
        50,
      );
      victim.child.proc.kill('SIGKILL');
      await victim.child.exited;
      workers.push(await startWorker(db.url, 1, 'short-worker-b'));
      // Recovery: the run is back in the queue under a new job, or already running on the new worker.
      await waitFor(
        'the orphaned run released from the dead worker',
        async () => {
          const { rows } = await pool.query(`SELECT worker_id FROM runs WHERE id = $1`, [held]);
          return rows[0].worker_id !== victim.workerId ? true : undefined;
        },
        30_000,
        50,
      );
      const final = await waitAllTerminal(pool, ids, 50_000);
      expect([...final.values()].map((r) => r.status)).toEqual(['succeeded', 'succeeded', 'succeeded']);
      expect(final.get(held)!.attempts).toBeGreaterThan(1);
      // Usage is written just after a run's ending; once all three are there, no fourth may follow.
      const usage = await waitFor(
        'one usage row per run',
        async () => {
          const { rows } = await pool.query(`SELECT count(*)::int AS n, count(DISTINCT run_id)::int AS runs FROM run_usage WHERE run_id = ANY($1::uuid[])`, [ids]);
          return rows[0].runs === 3 ? rows[0] : undefined;
        },
        30_000,
        50,
      );
      expect(usage.n).toBe(3);
    } finally {
      await pool.end();
    }
  });
});
