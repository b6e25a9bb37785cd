// The webhook delivery queue: a slow receiver holds one delivery slot, never the queue; an
// endpoint's deliveries go out one at a time in the order of their events; and the plan caps the
// endpoints a tenant may have.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startWorkers } from '../../../api/src/services/workers';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { startWebhookReceiver, type WebhookReceiver } from '../../support/webhook-receiver';
import { bearer, FAST_QUEUE_ENV } from './run-helpers';

describe('the webhook delivery queue', () => {
  let t: TestApp;
  let workers: Awaited<ReturnType<typeof startWorkers>>;
  const receivers: WebhookReceiver[] = [];
  beforeAll(async () => {
    // A held answer must not run into the attempt's time limit while the test holds it.
    t = await startTestApp({ ...FAST_QUEUE_ENV, WEBHOOK_TIMEOUT_MS: '600000' });
    workers = await startWorkers(t.ctx, { concurrency: 1 });
  });
  afterAll(async () => {
    await workers.stop();
    await Promise.all(receivers.map((r) => r.close()));
    await t.close();
  });

  const receiver = async () => {
    const r = await startWebhookReceiver();
    receivers.push(r);
    return r;
  };
  const endpointFor = async (key: string, url: string) => (await request(t.app).post('/v1/webhook-endpoints').set(bearer(key)).send({ url }).expect(201)).body.id as string;
  const sendTest = async (key: string, endpointId: string) => (await request(t.app).post(`/v1/webhook-endpoints/${endpointId}/test`).set(bearer(key)).expect(202)).body;
  async function deliveryStatus(id: string, want: string) {
    for (;;) {
      const [row] = await t.ctx.db.query('SELECT status FROM webhook_deliveries WHERE id = $1', [id]);
      if (row.status === want) return;
      await new Promise((r) => setTimeout(r, 50));
    }
  }

  it("a slow receiver holds one slot, not the queue: another tenant's delivery goes out while it waits, and its own go out one at a time, in order", async () => {
    const slow = await receiver();
    const fast = await receiver();
    const a = await createTenantWithKey(t.ctx);
    const b = await createTenantWithKey(t.ctx);
    let release!: () => void;
    slow.script({ status: 200, until: new Promise<void>((resolve) => (release = resolve)) });
    const slowEndpoint = await endpointFor(a.apiKey, slow.url);
    const fastEndpoint = await endpointFor(b.apiKey, fast.url);

    const queued = [];
    for (let i = 0; i < 3; i++) queued.push(await sendTest(a.apiKey, slowEndpoint));
    await slow.waitFor(1);
    const other = await sendTest(b.apiKey, fastEndpoint);
    await fast.waitFor(1);
    await deliveryStatus(other.id, 'succeeded');
    // The slow receiver still holds its first delivery, and its endpoint's others wait behind it.
    expect(slow.received).toHaveLength(1);
    const [{ n: waiting }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM webhook_deliveries WHERE endpoint_id = $1 AND status = 'pending' AND dispatched_at IS NULL`, [slowEndpoint]);
    expect(waiting).toBe(2);

    release();
    const hits = await slow.waitFor(3);
    expect(hits.map((h) => h.headers['webhook-id'])).toEqual(queued.map((d) => d.messageId));
    for (const d of queued) await deliveryStatus(d.id, 'succeeded');
  });

  it("caps a tenant's webhook endpoints at its plan's limit with a 422 problem; an operator's override moves the cap", async () => {
    const { apiKey, tenantId } = await createTenantWithKey(t.ctx, { plan: 'pilot' });
    const hook = await receiver();
    // The ladder set by the migration that introduced the cap.
    const plans = (await request(t.app).get('/v1/plans').set(bearer(apiKey)).expect(200)).body.items;
    expect(Object.fromEntries(plans.map((p: any) => [p.id, p.limits.webhookEndpoints]))).toEqual({ pilot: 2, field: 10, fleet: 50 });
    expect((await request(t.app).get('/v1/tenant').set(bearer(apiKey)).expect(200)).body.limits.webhookEndpoints).toBe(2);

    const first = await endpointFor(apiKey, hook.url);
    await endpointFor(apiKey, hook.url);
    const refused = await request(t.app).post('/v1/webhook-endpoints').set(bearer(apiKey)).send({ url: hook.url });
    expect(refused.status).toBe(422);
    expect(refused.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(refused.body).toMatchObject({ type: '/problems/plan-webhook-endpoints', status: 422, limit: 2, count: 2 });

    const operator = await createUserSession(t.ctx, t.app, { tenantId, role: 'operator' });
    const raised = await request(t.app)
      .patch(`/v1/admin/tenants/${tenantId}`)
      .set('Cookie', operator.cookie)
      .set('X-CSRF-Token', operator.csrf)
      .send({ limitOverrides: { webhookEndpoints: 3 } })
      .expect(200);
    expect(raised.body.limits.webhookEndpoints).toBe(3);
    await endpointFor(apiKey, hook.url);
    expect((await request(t.app).post('/v1/webhook-endpoints').set(bearer(apiKey)).send({ url: hook.url })).body).toMatchObject({ limit: 3, count: 3 });

    await request(t.app).delete(`/v1/webhook-endpoints/${first}`).set(bearer(apiKey)).expect(204);
    await endpointFor(apiKey, hook.url);
  });
});
