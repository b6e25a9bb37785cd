// Shortened fault test: the solver's worker thread dies inside a run (terminated mid-solve, as a
// WebAssembly crash would end it). The run ends failed with a message that says so, and the same
// worker goes on to solve the next run.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { solveSite } from '../../api/src/engine/solve-site';
import { HighsSolverPool } from '../../api/src/solver/highs-solver-pool';
import { stopQueue } from '../../api/src/services/job-queue';
import { startWorkers } from '../../api/src/services/workers';
import { newPool, waitAllTerminal } from '../soak/lib/harness';
import { busySiteSpec, smallSiteSpec } from '../soak/lib/specs';
import { createTenantWithKey } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';

/** The real engine; for runs named "crash" the solver thread is terminated as soon as it starts. */
const crashingSolve: typeof solveSite = async (spec, opts) => {
  if (spec.name !== 'crash') return solveSite(spec, opts);
  const solver = new HighsSolverPool();
  // Fault injection: reach the pool's worker threads and kill one while it is solving (no public
  // API does this, on purpose).
  const timer = setInterval(() => {
    for (const slot of (solver as any).slots as { busy: boolean; worker: { terminate(): Promise<number> } }[]) if (slot.busy) void slot.worker.terminate();
  }, 20);
  try {
    return await solveSite(spec, { ...opts, solver });
  } finally {
    clearInterval(timer);
    await solver.close();
  }
};

describe('a solver crash inside a run (short)', () => {
  let t: TestApp;
  let workers: Awaited<ReturnType<typeof startWorkers>>;
  beforeAll(async () => {
    t = await startTestApp({ QUEUE_POLLING_SECONDS: '0.5' });
    workers = await startWorkers(t.ctx, { concurrency: 1, solve: crashingSolve });
  });
  afterAll(async () => {
    await workers.stop();
    await stopQueue(t.ctx, { graceful: false });
    await t.close();
  });

  it('fails the run with a clear message and keeps serving', async () => {
    const { apiKey } = await createTenantWithKey(t.ctx);
    const crash = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(busySiteSpec('crash', 10));
    expect(crash.status, crash.text).toBe(202);
    const pool = newPool(t.databaseUrl);
    try {
      const ended = (await waitAllTerminal(pool, [crash.body.id], 45_000)).get(crash.body.id)!;
      expect(ended.status).toBe('failed');
      expect(ended.error.message).toMatch(/solver/i);
      const next = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(smallSiteSpec('after the crash'));
      const after = (await waitAllTerminal(pool, [next.body.id], 45_000)).get(next.body.id)!;
      expect(after.status).toBe('succeeded');
      const { rows } = await pool.query(`SELECT DISTINCT worker_id FROM runs WHERE id = ANY($1::uuid[])`, [[crash.body.id, next.body.id]]);
      expect(rows.map((r) => r.worker_id)).toEqual([workers.workerId]);
    } finally {
      await pool.end();
    }
  });
});
