import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { inject } from 'vitest';
import { startCluster, type Cluster } from '../../scripts/lib/postgres.mjs';
import { PUBLIC_BODY_LIMIT_BYTES } from '../../api/src/app';
import { createTenantWithKey } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';

function expectProblem(res: request.Response, status: number) {
  expect(res.status).toBe(status);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.body).toMatchObject({ status, type: expect.any(String), title: expect.any(String), detail: expect.any(String) });
  expect(JSON.stringify(res.body)).not.toMatch(/at .+\.(ts|js):\d+/);
}

describe('the HTTP spine', () => {
  let t: TestApp;
  let apiKey: string;
  beforeAll(async () => {
    t = await startTestApp();
    ({ apiKey } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  it('answers /healthz and /readyz on a migrated database', async () => {
    await request(t.app).get('/healthz').expect(200, { status: 'ok' });
    await request(t.app).get('/readyz').expect(200, { status: 'ready' });
  });

  it('gives an unknown /v1 route a problem+json 404', async () => {
    const res = await request(t.app).get('/v1/no-such-thing').set('Accept', 'application/json');
    expectProblem(res, 404);
  });

  it('gives an unknown non-API route a problem+json 404 when HTML is not wanted', async () => {
    const res = await request(t.app).get('/no-such-page').set('Accept', 'application/json');
    expectProblem(res, 404);
  });

  it('refuses a body over the size limit with 413', async () => {
    const huge = JSON.stringify({ blob: 'x'.repeat(9 * 1024 * 1024) });
    const res = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).set('Content-Type', 'application/json').send(huge);
    expectProblem(res, 413);
  });

  it(`refuses a body over ${PUBLIC_BODY_LIMIT_BYTES} bytes on a public route with 413`, async () => {
    const res = await request(t.app).post('/v1/auth/sign-in').set('Content-Type', 'application/json').send(JSON.stringify({ email: 'a@example.test', password: 'x'.repeat(70 * 1024) }));
    expectProblem(res, 413);
  });

  it('refuses malformed JSON with 400 naming the body', async () => {
    const res = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).set('Content-Type', 'application/json').send('{"horizon": ');
    expectProblem(res, 400);
    expect(res.body.errors[0].pointer).toBe('');
  });

  it('serves metrics, the OpenAPI document and Swagger UI', async () => {
    await request(t.app).get('/healthz');
    const metrics = await request(t.app).get('/metrics').expect(200);
    expect(metrics.text).toContain('gridwright_http_request_duration_seconds');
    const doc = await request(t.app).get('/openapi.yaml').expect(200);
    expect(doc.text).toMatch(/^openapi: 3\.1\.0/);
    const docs = await request(t.app).get('/docs/').expect(200);
    expect(docs.text).toContain('swagger-ui');
  });

  it('sets security headers and a request id', async () => {
    const res = await request(t.app).get('/healthz');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['x-request-id']).toBeTruthy();
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

describe('/readyz follows the database', () => {
  let cluster: Cluster;
  let t: TestApp;
  let tmp: string;
  beforeAll(async () => {
    tmp = mkdtempSync(path.join(os.tmpdir(), 'gw-ready-'));
    cluster = await startCluster({ bin: inject('pg').bin, dir: path.join(tmp, 'postgres'), ephemeral: true });
    const { createDataSource } = await import('../../api/src/db/data-source');
    const db = createDataSource(cluster.url);
    await db.initialize();
    await db.runMigrations();
    await db.destroy();
    t = await startTestApp({ DATABASE_URL: cluster.url });
  });
  afterAll(async () => {
    await t.ctx.db.destroy().catch(() => {});
    cluster.forceStop();
    rmSync(tmp, { recursive: true, force: true });
  });

  it('goes 503 when PostgreSQL stops and back to 200 when it returns', async () => {
    await request(t.app).get('/readyz').expect(200);
    cluster.forceStop();
    const down = await request(t.app).get('/readyz');
    expectProblem(down, 503);
    expect(down.headers['retry-after']).toBe('5');
    cluster.restart();
    let status = 0;
    for (let i = 0; i < 50 && status !== 200; i++) {
      status = (await request(t.app).get('/readyz')).status;
      if (status !== 200) await new Promise((r) => setTimeout(r, 200));
    }
    expect(status).toBe(200);
  });
});
