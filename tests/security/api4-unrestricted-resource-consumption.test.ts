// OWASP API Security Top 10 (2023), API4 Unrestricted Resource Consumption: body and upload size
// limits, the plan's step and unit caps, the solver time-limit ceiling, per-key rate limits with
// the IETF RateLimit fields and Retry-After, the monthly run quota — and no body read or parsed for
// a caller that is not authenticated on a route that needs it.
import type { Server } from 'node:http';
import net, { type AddressInfo } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MAX_TIME_LIMIT_SECONDS } from '../../shared/src/site-spec';
import { createTenantWithKey } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';

function spec(steps: number, units = 1) {
  return {
    horizon: { start: '2027-05-03T00:00:00+02:00', stepMinutes: 15, steps },
    supply: { availableKw: new Array(steps).fill(50) },
    units: Array.from({ length: units }, (_v, i) => ({ id: `pump-${i}`, kind: 'flexible-load', ratingKw: 20, valuePerKwh: 0.05 })),
    solver: { timeLimitSeconds: 5 },
  };
}

function expectProblem(res: request.Response, status: number, type?: string) {
  expect(res.status, res.text.slice(0, 300)).toBe(status);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  if (type) expect(res.body.type).toBe(type);
}

describe('API4 unrestricted resource consumption', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ BODY_LIMIT: '64kb', SERIES_MAX_BYTES: '2048', RATE_LIMIT_WINDOW_SECONDS: '30' });
  });
  afterAll(async () => t.close());

  const setOverrides = (tenantId: string, overrides: Record<string, number>) =>
    t.ctx.db.query(`UPDATE tenants SET limit_overrides = $2::jsonb WHERE id = $1`, [tenantId, JSON.stringify(overrides)]);

  it('refuses a JSON body over BODY_LIMIT with 413 before reading it into a spec', async () => {
    const { apiKey } = await createTenantWithKey(t.ctx);
    const res = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).set('Content-Type', 'application/json').send(JSON.stringify({ pad: 'x'.repeat(70_000) }));
    expectProblem(res, 413, '/problems/payload-too-large');
  });

  it('refuses an upload over SERIES_MAX_BYTES with 413 naming the file, storing nothing', async () => {
    const { apiKey, tenantId } = await createTenantWithKey(t.ctx);
    const rows = Array.from({ length: 200 }, (_v, i) => `2027-05-03T${String(Math.floor(i / 4) % 24).padStart(2, '0')}:${String((i % 4) * 15).padStart(2, '0')}:00Z,${i}`);
    const csv = `timestamp,pv\n${rows.join('\n')}\n`;
    expect(csv.length).toBeGreaterThan(2048);
    const res = await request(t.app).post('/v1/series').set('Authorization', `Bearer ${apiKey}`).attach('file', Buffer.from(csv), { filename: 'big.csv', contentType: 'text/csv' });
    expectProblem(res, 413);
    expect(res.body.errors[0].pointer).toBe('/file');
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM series WHERE tenant_id = $1`, [tenantId]);
    expect(n).toBe(0);
  });

  it("refuses a spec above the plan's step and unit caps with the numbers (pilot: 672 steps, 5 units)", async () => {
    const { apiKey } = await createTenantWithKey(t.ctx, { plan: 'pilot' });
    const steps = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(spec(673));
    expectProblem(steps, 422, '/problems/plan-max-steps');
    expect(steps.body.errors[0].pointer).toBe('/horizon/steps');
    expect(steps.body.detail).toMatch(/673.*672/);
    const units = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(spec(4, 6));
    expectProblem(units, 422, '/problems/plan-max-units');
    expect(units.body.detail).toMatch(/6.*5/);
    const ok = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(spec(672, 5));
    expect(ok.status, ok.text).toBe(202);
  });

  it(`refuses a solver time limit above ${MAX_TIME_LIMIT_SECONDS} s and a horizon above 35 136 steps`, async () => {
    const { apiKey } = await createTenantWithKey(t.ctx);
    const long = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send({ ...spec(4), solver: { timeLimitSeconds: MAX_TIME_LIMIT_SECONDS + 1 } });
    expectProblem(long, 400);
    expect(long.body.errors.map((e: { pointer: string }) => e.pointer)).toContain('/solver/timeLimitSeconds');
    const huge = await request(t.app).post('/v1/specs/validate').set('Authorization', `Bearer ${apiKey}`).send({ ...spec(1), horizon: { start: '2027-05-03T00:00:00+02:00', stepMinutes: 15, steps: 35_137 } });
    expectProblem(huge, 400);
    expect(huge.body.errors.map((e: { pointer: string }) => e.pointer)).toContain('/horizon/steps');
  });

  it('rate limits a key with 429, Retry-After and the RateLimit header fields', async () => {
    const { apiKey, tenantId } = await createTenantWithKey(t.ctx);
    // 0.2 requests per second over a 30 s window: six requests per window for the key.
    await setOverrides(tenantId, { requestsPerSecond: 0.2 });
    const statuses: number[] = [];
    let refused: request.Response | null = null;
    for (let i = 0; i < 10; i++) {
      const res = await request(t.app).get('/v1/runs').set('Authorization', `Bearer ${apiKey}`);
      statuses.push(res.status);
      expect(res.headers['ratelimit'], 'RateLimit on every metered answer').toMatch(/"credential";r=\d+;t=\d+/);
      expect(res.headers['ratelimit-policy']).toBeTruthy();
      if (res.status === 429) refused ??= res;
    }
    expect(statuses.slice(0, 6)).toEqual([200, 200, 200, 200, 200, 200]);
    expect(statuses.slice(6)).toEqual([429, 429, 429, 429]);
    expectProblem(refused!, 429, '/problems/rate-limited');
    expect(Number(refused!.headers['retry-after'])).toBeGreaterThan(0);
  });

  it('refuses runs over the monthly run quota with the numbers, and counts only accepted runs', async () => {
    const { apiKey, tenantId } = await createTenantWithKey(t.ctx);
    await setOverrides(tenantId, { monthlyRuns: 2 });
    for (let i = 0; i < 2; i++) expect((await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(spec(4))).status).toBe(202);
    const over = await request(t.app).post('/v1/runs').set('Authorization', `Bearer ${apiKey}`).send(spec(4));
    expectProblem(over, 429, '/problems/quota-monthly-runs');
    expect(over.body.detail).toMatch(/2 of 2 runs/);
    expect(Number(over.headers['retry-after'])).toBeGreaterThan(0);
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM runs WHERE tenant_id = $1`, [tenantId]);
    expect(n).toBe(2);
    // Validation is free: it neither needs nor uses quota.
    expect((await request(t.app).post('/v1/specs/validate').set('Authorization', `Bearer ${apiKey}`).send(spec(4))).status).toBe(200);
  });
});

/**
 * Sends a request over a raw socket: the head, then (unless `bodyBytes` is 0) that many body bytes
 * in the background. Resolves with the response head as soon as it arrives, whatever happened to
 * the body: a server that refuses before reading it may close the connection under the writer.
 */
function rawRequest(port: number, head: string, bodyBytes: number): Promise<string> {
  return new Promise((resolve, reject) => {
    const socket = net.connect(port, '127.0.0.1');
    let received = '';
    socket.on('error', (err) => (received.includes('\r\n\r\n') ? resolve(received) : reject(err)));
    socket.on('data', (chunk) => {
      received += chunk.toString('latin1');
      if (received.includes('\r\n\r\n')) {
        socket.destroy();
        resolve(received.slice(0, received.indexOf('\r\n\r\n')));
      }
    });
    socket.write(head);
    if (bodyBytes > 0) {
      const chunk = Buffer.alloc(64 * 1024, 'a');
      let left = bodyBytes;
      const pump = () => {
        while (left > 0 && !socket.destroyed) {
          const n = Math.min(left, chunk.length);
          left -= n;
          if (!socket.write(chunk.subarray(0, n))) return socket.once('drain', pump);
        }
      };
      pump();
    }
  });
}

describe('API4 authentication comes before the body', () => {
  const BODY = 7_800_000;
  let t: TestApp;
  let server: Server;
  let port: number;
  const parsed = async (caller: 'authenticated' | 'public') => (await t.ctx.metrics.bodiesParsed.get()).values.find((v) => v.labels.caller === caller)?.value ?? 0;
  beforeAll(async () => {
    t = await startTestApp();
    server = await new Promise<Server>((resolve) => {
      const s = t.app.listen(0, '127.0.0.1', () => resolve(s));
    });
    port = (server.address() as AddressInfo).port;
  });
  afterAll(async () => {
    server?.closeAllConnections();
    await new Promise((r) => server?.close(r));
    await t?.close();
  });

  const head = (path: string, headers: Record<string, string> = {}) =>
    [`POST ${path} HTTP/1.1`, 'Host: 127.0.0.1', 'Content-Type: application/json', `Content-Length: ${BODY}`, ...Object.entries(headers).map(([k, v]) => `${k}: ${v}`), '', ''].join('\r\n');

  it('answers 401 to an unauthenticated request from its headers alone, never waiting for the body', async () => {
    // Not one body byte is sent: a server that read the body before authenticating would never answer.
    for (const path of ['/v1/runs', '/v1/specs/validate', '/v1/webhook-endpoints', '/v1/admin/tenants']) {
      const answer = await rawRequest(port, head(path), 0);
      expect(answer, path).toMatch(/^HTTP\/1\.1 401 /);
      expect(answer.toLowerCase(), path).toContain('connection: close');
    }
    const badKey = await rawRequest(port, head('/v1/runs', { Authorization: 'Bearer gw_000000000000_' + 'a'.repeat(43) }), 0);
    expect(badKey).toMatch(/^HTTP\/1\.1 401 /);
  });

  it('parses none of ten large unauthenticated bodies sent at once', async () => {
    const before = await parsed('authenticated');
    const answers = await Promise.all(Array.from({ length: 10 }, () => rawRequest(port, head('/v1/runs'), BODY)));
    for (const answer of answers) expect(answer).toMatch(/^HTTP\/1\.1 401 /);
    expect(await parsed('authenticated')).toBe(before);
    expect(await parsed('public')).toBe(0);
  });

  it('reads and parses the body of an authenticated caller (the counter counts)', async () => {
    const { apiKey } = await createTenantWithKey(t.ctx);
    const before = await parsed('authenticated');
    const res = await request(server).post('/v1/specs/validate').set('Authorization', `Bearer ${apiKey}`).send({ horizon: {} });
    expect([200, 400], res.text).toContain(res.status);
    expect(await parsed('authenticated')).toBe(before + 1);
  });

  it('gives the public routes a small body limit: a large sign-in body is a 413, not parsed', async () => {
    const answer = await rawRequest(port, head('/v1/auth/sign-in'), 0);
    expect(answer).toMatch(/^HTTP\/1\.1 413 /);
    expect(await parsed('public')).toBe(0);
  });
});
