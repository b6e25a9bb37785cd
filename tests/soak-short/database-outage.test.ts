// Shortened fault test: PostgreSQL stops for a few seconds. Submissions and readiness answer 503
// problem+json meanwhile; afterwards the API takes runs again by itself, and the in-process worker
// completes both the run accepted before the outage and the one accepted after it.
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createDataSource } from '../../api/src/db/data-source';
import { stopQueue } from '../../api/src/services/job-queue';
import { startWorkers } from '../../api/src/services/workers';
import { startCluster, type Cluster } from '../../scripts/lib/postgres.mjs';
import { newPool, waitAllTerminal } from '../soak/lib/harness';
import { smallSiteSpec } from '../soak/lib/specs';
import { createTenantWithKey } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';

describe('PostgreSQL outage (short)', () => {
  let cluster: Cluster;
  let tmp: string;
  let t: TestApp;
  let workers: Awaited<ReturnType<typeof startWorkers>>;
  beforeAll(async () => {
    tmp = mkdtempSync(path.join(os.tmpdir(), 'gw-outage-'));
    cluster = await startCluster({ bin: inject('pg').bin, dir: path.join(tmp, 'postgres'), ephemeral: true });
    const db = createDataSource(cluster.url);
    await db.initialize();
    await db.runMigrations({ transaction: 'each' });
    await db.destroy();
    t = await startTestApp({ DATABASE_URL: cluster.url, QUEUE_POLLING_SECONDS: '0.5' });
    workers = await startWorkers(t.ctx, { concurrency: 1 });
  });
  afterAll(async () => {
    await workers?.stop().catch(() => {});
    await stopQueue(t.ctx, { graceful: false }).catch(() => {});
    await t.ctx.db.destroy().catch(() => {});
    cluster.forceStop();
    rmSync(tmp, { recursive: true, force: true });
  });

  it('answers 503 problem+json while the database is down and recovers by itself', async () => {
    const { apiKey } = await createTenantWithKey(t.ctx);
    const submit = () => request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(smallSiteSpec('outage short'));
    const before = await submit();
    expect(before.status).toBe(202);

    cluster.forceStop();
    const down = await submit();
    expect(down.status, down.text).toBe(503);
    expect(down.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(down.headers['retry-after']).toBeTruthy();
    const ready = await request(t.app).get('/readyz');
    expect(ready.status).toBe(503);
    cluster.restart();

    let after = await submit();
    for (let i = 0; i < 60 && after.status !== 202; i++) {
      expect(after.status, after.text).toBe(503);
      await new Promise((r) => setTimeout(r, 250));
      after = await submit();
    }
    expect(after.status).toBe(202);
    const pool = newPool(cluster.url);
    try {
      const final = await waitAllTerminal(pool, [before.body.id, after.body.id], 45_000);
      expect([...final.values()].map((r) => r.status)).toEqual(['succeeded', 'succeeded']);
    } finally {
      await pool.end();
    }
  });
});
