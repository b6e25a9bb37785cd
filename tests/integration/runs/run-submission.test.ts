import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { validateSiteSpec } from '@gridwright/shared/site-spec';
import { endDeadLetteredRun } from '../../../api/src/runs/runner';
import { createTenantWithKey } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { bearer, FAST_QUEUE_ENV, smallSpec } from './run-helpers';

// No worker runs here: these tests are about what the API accepts and how it reads runs back.
describe('submitting and reading runs', () => {
  let t: TestApp;
  let key: string;
  let otherKey: string;
  beforeAll(async () => {
    t = await startTestApp(FAST_QUEUE_ENV);
    key = (await createTenantWithKey(t.ctx)).apiKey;
    otherKey = (await createTenantWithKey(t.ctx)).apiKey;
  });
  afterAll(async () => t.close());

  it('turns 20 concurrent submissions with one Idempotency-Key into one run, and refuses a different body with 422', async () => {
    const spec = smallSpec({ name: 'idempotent' });
    const answers = await Promise.all(
      Array.from({ length: 20 }, () => request(t.app).post('/v1/runs').set(bearer(key)).set('Idempotency-Key', 'batch-2027-03-01').send(spec)),
    );
    expect(answers.map((a) => a.status)).toEqual(new Array(20).fill(202));
    const ids = new Set(answers.map((a) => a.body.id));
    expect(ids.size).toBe(1);
    expect(answers.filter((a) => a.headers['idempotent-replayed'] === 'true')).toHaveLength(19);
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM runs WHERE name = 'idempotent'`);
    expect(n).toBe(1);
    const [{ jobs }] = await t.ctx.db.query(`SELECT count(*)::int AS jobs FROM pgboss.job WHERE name = 'run-solve' AND data->>'runId' = $1`, [[...ids][0]]);
    expect(jobs).toBe(1);

    // The same body with its keys in another order is the same request (the fingerprint is canonical).
    const reordered = Object.fromEntries(Object.entries(spec).reverse());
    const again = await request(t.app).post('/v1/runs').set(bearer(key)).set('Idempotency-Key', 'batch-2027-03-01').send(reordered);
    expect(again.status).toBe(202);
    expect(again.body.id).toBe([...ids][0]);

    const different = await request(t.app).post('/v1/runs').set(bearer(key)).set('Idempotency-Key', 'batch-2027-03-01').send(smallSpec({ name: 'other body' }));
    expect(different.status).toBe(422);
    expect(different.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(different.body.type).toBe('/problems/idempotency-key-reused');

    // Keys are per tenant: another tenant's identical key makes its own run.
    const elsewhere = await request(t.app).post('/v1/runs').set(bearer(otherKey)).set('Idempotency-Key', 'batch-2027-03-01').send(spec);
    expect(elsewhere.status).toBe(202);
    expect(elsewhere.body.id).not.toBe([...ids][0]);
  });

  it('forgets a key after it expires', async () => {
    const first = await request(t.app).post('/v1/runs').set(bearer(key)).set('Idempotency-Key', 'expiring').send(smallSpec({ name: 'e1' }));
    await t.ctx.db.query(`UPDATE idempotency_keys SET expires_at = now() - interval '1 second' WHERE key = 'expiring'`);
    const second = await request(t.app).post('/v1/runs').set(bearer(key)).set('Idempotency-Key', 'expiring').send(smallSpec({ name: 'e2' }));
    expect(second.status).toBe(202);
    expect(second.body.id).not.toBe(first.body.id);
  });

  it('answers 400 problem+json with pointers for a body that breaks the OpenAPI schema', async () => {
    const bad = { ...smallSpec(), horizon: { start: 'yesterday', stepMinutes: 7, steps: 0 }, units: [{ id: 'x', kind: 'turbine', ratingKw: -1 }], extra: true };
    for (const path of ['/v1/specs/validate', '/v1/runs']) {
      const res = await request(t.app).post(path).set(bearer(key)).send(bad);
      expect(res.status).toBe(400);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
      const pointers = res.body.errors.map((e: { pointer: string }) => e.pointer);
      expect(pointers).toEqual(expect.arrayContaining(['/horizon/start', '/horizon/stepMinutes', '/horizon/steps', '/units/0/kind', '/units/0/ratingKw', '/extra']));
      // One validator owns the spec: the API answers exactly what the shared one (the console's too) says.
      const shared = validateSiteSpec(bad);
      expect(shared.ok).toBe(false);
      if (!shared.ok) expect(res.body.errors).toEqual(shared.errors);
    }
  });

  it('answers 400 with pointers for rules beyond the schema (array lengths, unknown series)', async () => {
    const res = await request(t.app)
      .post('/v1/specs/validate')
      .set(bearer(key))
      .send(smallSpec({ supply: { availableKw: [1, 2, 3] } }));
    expect(res.status).toBe(400);
    expect(res.body.errors).toEqual([expect.objectContaining({ pointer: '/supply/availableKw' })]);
    const segments = await request(t.app)
      .post('/v1/specs/validate')
      .set(bearer(key))
      .send(smallSpec({ solver: { window: { segmentWindows: 1, lookahead: 'integer' } } }));
    expect(segments.status).toBe(400);
    expect(segments.body.errors).toEqual([expect.objectContaining({ pointer: '/solver/window/segmentWindows' })]);
    const series = await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ supply: { seriesId: 'ser_00000000000000000000000000000000' } }));
    expect(series.status).toBe(400);
    expect(series.body.errors[0].pointer).toBe('/supply/seriesId');
  });

  it('validates a good spec with warnings and a model-size estimate, without creating a run', async () => {
    const [{ before }] = await t.ctx.db.query('SELECT count(*)::int AS before FROM runs');
    const res = await request(t.app).post('/v1/specs/validate').set(bearer(key)).send(smallSpec());
    expect(res.status).toBe(200);
    expect(res.body.valid).toBe(true);
    expect(Array.isArray(res.body.warnings)).toBe(true);
    expect(res.body.modelSize.binaries.before).toBeGreaterThanOrEqual(res.body.modelSize.binaries.after);
    const [{ after }] = await t.ctx.db.query('SELECT count(*)::int AS after FROM runs');
    expect(after).toBe(before);
  });

  it("hides another tenant's run behind 404", async () => {
    const mine = await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec());
    for (const suffix of ['', '/spec', '/schedule', '/log']) {
      const res = await request(t.app).get(`/v1/runs/${mine.body.id}${suffix}`).set(bearer(otherKey));
      expect(res.status).toBe(404);
    }
    expect((await request(t.app).post(`/v1/runs/${mine.body.id}/cancel`).set(bearer(otherKey))).status).toBe(404);
  });

  it('lists newest first with cursor pagination and a Link rel="next", filtered by status', async () => {
    const fresh = await createTenantWithKey(t.ctx);
    const created: string[] = [];
    for (let i = 0; i < 5; i++) created.push((await request(t.app).post('/v1/runs').set(bearer(fresh.apiKey)).send(smallSpec({ name: `page-${i}` }))).body.id);
    const seen: string[] = [];
    let url: string | null = '/v1/runs?limit=2';
    let pages = 0;
    while (url) {
      const res: request.Response = await request(t.app).get(url).set(bearer(fresh.apiKey)).expect(200);
      seen.push(...res.body.items.map((r: { id: string }) => r.id));
      const link = res.headers.link as string | undefined;
      url = link ? /<([^>]+)>;\s*rel="next"/.exec(link)![1] : null;
      expect(Boolean(link)).toBe(res.body.nextCursor !== null);
      pages++;
    }
    expect(pages).toBe(3);
    expect(seen).toEqual([...created].reverse());

    await request(t.app).post(`/v1/runs/${created[0]}/cancel`).set(bearer(fresh.apiKey)).expect(202);
    const cancelled = await request(t.app).get('/v1/runs?status=cancelled').set(bearer(fresh.apiKey)).expect(200);
    expect(cancelled.body.items.map((r: { id: string }) => r.id)).toEqual([created[0]]);
    const queued = await request(t.app).get('/v1/runs?status=queued,running').set(bearer(fresh.apiKey)).expect(200);
    expect(queued.body.items).toHaveLength(4);
    const none = await request(t.app).get(`/v1/runs?createdAfter=${encodeURIComponent(new Date(Date.now() + 60_000).toISOString())}`).set(bearer(fresh.apiKey)).expect(200);
    expect(none.body.items).toEqual([]);
    const badCursor = await request(t.app).get('/v1/runs?cursor=not-a-cursor').set(bearer(fresh.apiKey));
    expect(badCursor.status).toBe(400);
  });

  it('ends a dead-lettered run (its job kept failing) failed instead of leaving it hanging', async () => {
    const res = await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec({ name: 'dead' })).expect(202);
    const [{ job_id: jobId }] = await t.ctx.db.query('SELECT job_id FROM runs WHERE id = $1', [res.body.id]);
    await endDeadLetteredRun(t.ctx, { runId: res.body.id, jobId });
    const run = await request(t.app).get(`/v1/runs/${res.body.id}`).set(bearer(key)).expect(200);
    expect(run.body).toMatchObject({ status: 'failed', error: { code: 'worker-lost' } });
    await endDeadLetteredRun(t.ctx, { runId: res.body.id, jobId });
    expect((await request(t.app).get(`/v1/runs/${res.body.id}`).set(bearer(key))).body.finishedAt).toBe(run.body.finishedAt);
  });
});
