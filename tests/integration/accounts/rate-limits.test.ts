import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiKey } from '../../../api/src/services/api-keys';
import { updateTenant } from '../../../api/src/services/tenants';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

describe('request rate limits', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '600' });
  });
  afterAll(async () => t.close());

  it('sends the RateLimit fields, refuses with 429 + Retry-After per key, then per tenant', async () => {
    const { tenantId, apiKey } = await createTenantWithKey(t.ctx);
    // 0.1 request/s over a 600 s window: 60 per key, 180 for the tenant; the window outlasts the test.
    await updateTenant(t.ctx, tenantId, { limitOverrides: { requestsPerSecond: 0.1 } }, {});
    const get = (key: string) => request(t.app).get('/v1/tenant').set('Authorization', `Bearer ${key}`);

    const first = await get(apiKey).expect(200);
    expect(first.headers['ratelimit-policy']).toBe('"credential";q=60;w=600, "tenant";q=180;w=600');
    expect(first.headers['ratelimit']).toMatch(/^"credential";r=59;t=\d+, "tenant";r=179;t=\d+$/);
    for (let i = 1; i < 60; i++) await get(apiKey).expect(200);
    const limited = await get(apiKey).expect(429);
    expect(limited.headers['content-type']).toMatch(/problem\+json/);
    expect(limited.body.type).toBe('/problems/rate-limited');
    expect(limited.body.policies).toEqual(['credential']);
    expect(Number(limited.headers['retry-after'])).toBeGreaterThan(0);
    expect(limited.headers['ratelimit']).toMatch(/^"credential";r=0;/);

    const keys = await Promise.all([1, 2, 3].map(async (i) => (await createApiKey(t.ctx, { tenantId, name: `k${i}`, scopes: ['runs:read'] }, {})).key));
    await get(keys[0]!).expect(200);
    // 61 of the tenant's 180 are gone; three keys sharing the rest each stay below their own 60.
    let refused: request.Response | null = null;
    for (let i = 0; i < 150 && !refused; i++) {
      const res = await get(keys[i % 3]!);
      if (res.status === 429) refused = res;
    }
    expect(refused?.body.policies).toEqual(['tenant']);
  });
});

describe('request rate limits across API processes', () => {
  let a: TestApp;
  let b: TestApp;
  beforeAll(async () => {
    a = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '600' });
    b = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '600', DATABASE_URL: a.databaseUrl });
  });
  afterAll(async () => {
    await b?.close();
    await a?.close();
  });

  it('admits at most the quota across two processes, and no fewer than the quota less one batch', async () => {
    const { tenantId, apiKey } = await createTenantWithKey(a.ctx);
    // 0.1 request/s over a 600 s window: 60 per key; each process takes 60 / 20 = 3 points at a time,
    // so with two processes at most 3 sit unused in the other one when a request is refused.
    await updateTenant(a.ctx, tenantId, { limitOverrides: { requestsPerSecond: 0.1 } }, {});
    const get = (t: TestApp) => request(t.app).get('/v1/tenant').set('Authorization', `Bearer ${apiKey}`);
    const statuses: number[] = [];
    // Rounds of concurrent requests to both processes, as a load balancer would spread them.
    for (let round = 0; round < 10; round++) {
      const answers = await Promise.all(Array.from({ length: 10 }, (_, i) => get(i % 2 ? a : b)));
      statuses.push(...answers.map((r) => r.status));
    }
    const admitted = statuses.filter((s) => s === 200).length;
    expect(statuses.filter((s) => s !== 200 && s !== 429)).toEqual([]);
    expect(admitted).toBeLessThanOrEqual(60);
    expect(admitted).toBeGreaterThanOrEqual(60 - 3);
    const [{ points }] = await a.ctx.db.query(`SELECT points FROM rate_limits WHERE key LIKE 'rate-credential:60:600:key:%'`);
    expect(points).toBe(60);
  });
});
