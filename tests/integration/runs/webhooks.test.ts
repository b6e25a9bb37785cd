import request from 'supertest';
import { Webhook } from 'standardwebhooks';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startWorkers } from '../../../api/src/services/workers';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { startWebhookReceiver, type WebhookReceiver } from '../../support/webhook-receiver';
import { bearer, FAST_QUEUE_ENV, slowSpec, smallSpec, waitForRun } from './run-helpers';

async function waitForDelivery(t: TestApp, key: string, endpointId: string, until: (d: any) => boolean, timeoutMs = 20_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await request(t.app).get(`/v1/webhook-endpoints/${endpointId}/deliveries`).set(bearer(key)).expect(200);
    const found = res.body.items.find(until);
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no matching delivery in ${timeoutMs} ms: ${JSON.stringify(res.body.items)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('webhooks', () => {
  let t: TestApp;
  let key: string;
  let tenantId: string;
  let receiver: WebhookReceiver & { port: number };
  let workers: Awaited<ReturnType<typeof startWorkers>>;
  beforeAll(async () => {
    t = await startTestApp({ ...FAST_QUEUE_ENV, WEBHOOK_DISABLE_AFTER_FAILURES: '3', WEBHOOK_RETRY_LIMIT: '4' });
    ({ apiKey: key, tenantId } = await createTenantWithKey(t.ctx));
    receiver = await startWebhookReceiver();
    workers = await startWorkers(t.ctx, { concurrency: 1 });
  });
  afterAll(async () => {
    await workers.stop();
    await receiver.close();
    await t.close();
  });

  it('signs run events per Standard Webhooks, verified by the standardwebhooks library', async () => {
    const created = await request(t.app).post('/v1/webhook-endpoints').set(bearer(key)).send({ url: receiver.url, events: ['run.succeeded'] });
    expect(created.status).toBe(201);
    expect(created.body.secret).toMatch(/^whsec_/);
    const shown = await request(t.app).get(`/v1/webhook-endpoints/${created.body.id}`).set(bearer(key)).expect(200);
    expect(shown.body.secret).toBeUndefined();
    const listed = await request(t.app).get('/v1/webhook-endpoints').set(bearer(key)).expect(200);
    expect(JSON.stringify(listed.body)).not.toContain(created.body.secret);

    const run = await request(t.app).post('/v1/runs').set(bearer(key)).send(smallSpec()).expect(202);
    await waitForRun(t.app, key, run.body.id);
    const [hit] = await receiver.waitFor(1);
    const payload = new Webhook(created.body.secret).verify(hit.body, hit.headers as Record<string, string>) as any;
    expect(payload).toMatchObject({ type: 'run.succeeded', data: { runId: run.body.id, status: 'succeeded', outcome: 'optimal' } });
    expect(hit.headers['webhook-signature']).toMatch(/^v1,/);
    expect(() => new Webhook(created.body.secret).verify(hit.body.replace('succeeded', 'failed'), hit.headers as Record<string, string>)).toThrow();

    const delivered = await waitForDelivery(t, key, created.body.id, (d) => d.status === 'succeeded');
    expect(delivered.attempts).toHaveLength(1);
    const perRun = await request(t.app).get(`/v1/runs/${run.body.id}/webhook-deliveries`).set(bearer(key)).expect(200);
    expect(perRun.body.items.map((d: any) => d.messageId)).toEqual([hit.headers['webhook-id']]);
    await request(t.app).delete(`/v1/webhook-endpoints/${created.body.id}`).set(bearer(key)).expect(204);
  });

  it('retries after a 500 with the same message id, does not follow a redirect, and the new secret signs after rotation', async () => {
    receiver.received.length = 0;
    const created = await request(t.app).post('/v1/webhook-endpoints').set(bearer(key)).send({ url: receiver.url }).expect(201);
    const rotated = await request(t.app).post(`/v1/webhook-endpoints/${created.body.id}/rotate-secret`).set(bearer(key)).expect(200);
    expect(rotated.body.secret).not.toBe(created.body.secret);

    receiver.script({ status: 500 }, { status: 302, headers: { location: `http://127.0.0.1:${receiver.port}/elsewhere` } });
    const test = await request(t.app).post(`/v1/webhook-endpoints/${created.body.id}/test`).set(bearer(key));
    expect(test.status).toBe(202);
    const hits = await receiver.waitFor(3, 30_000);
    expect(new Set(hits.map((h) => h.headers['webhook-id'])).size).toBe(1);
    expect(hits.every((h) => h.path === '/hooks/gridwright')).toBe(true);
    const payload = new Webhook(rotated.body.secret).verify(hits[2].body, hits[2].headers as Record<string, string>) as any;
    expect(payload.type).toBe('webhook.test');
    expect(() => new Webhook(created.body.secret).verify(hits[2].body, hits[2].headers as Record<string, string>)).toThrow();

    const delivery = await waitForDelivery(t, key, created.body.id, (d) => d.id === test.body.id && d.status === 'succeeded');
    expect(delivery.attempts.map((a: any) => a.statusCode)).toEqual([500, 302, 200]);
    expect(delivery.attempts[1].error).toBe('redirect not followed');
    await request(t.app).delete(`/v1/webhook-endpoints/${created.body.id}`).set(bearer(key)).expect(204);
  });

  it('disables an endpoint after consecutive failures and e-mails the owners', async () => {
    const owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    receiver.received.length = 0;
    receiver.script(...Array.from({ length: 3 }, () => ({ status: 503 })));
    const created = await request(t.app).post('/v1/webhook-endpoints').set(bearer(key)).send({ url: receiver.url }).expect(201);
    const test = await request(t.app).post(`/v1/webhook-endpoints/${created.body.id}/test`).set(bearer(key)).expect(202);
    const failed = await waitForDelivery(t, key, created.body.id, (d) => d.id === test.body.id && d.status === 'failed', 40_000);
    expect(failed.attempts).toHaveLength(3);
    const endpoint = await request(t.app).get(`/v1/webhook-endpoints/${created.body.id}`).set(bearer(key)).expect(200);
    expect(endpoint.body).toMatchObject({ enabled: false, consecutiveFailures: 3 });
    expect(endpoint.body.disabledReason).toMatch(/3 consecutive/);

    let mails: { rcpt_to: string[] }[] = [];
    for (let i = 0; i < 50 && mails.length === 0; i++) {
      mails = await t.ctx.db.query(`SELECT rcpt_to FROM outbox_messages WHERE kind = 'webhook-disabled' AND tenant_id = $1`, [tenantId]);
      if (!mails.length) await new Promise((r) => setTimeout(r, 100));
    }
    expect(mails).toHaveLength(1);
    expect(mails[0].rcpt_to).toContain(owner.email);

    const enabled = await request(t.app).patch(`/v1/webhook-endpoints/${created.body.id}`).set(bearer(key)).send({ enabled: true }).expect(200);
    expect(enabled.body).toMatchObject({ enabled: true, consecutiveFailures: 0, disabledAt: null });
    await request(t.app).delete(`/v1/webhook-endpoints/${created.body.id}`).set(bearer(key)).expect(204);
  });

  it('sends run.cancelled when a run is cancelled', async () => {
    receiver.received.length = 0;
    const created = await request(t.app).post('/v1/webhook-endpoints').set(bearer(key)).send({ url: receiver.url, events: ['run.cancelled'] }).expect(201);
    const run = await request(t.app).post('/v1/runs').set(bearer(key)).send(slowSpec(6)).expect(202);
    await request(t.app).post(`/v1/runs/${run.body.id}/cancel`).set(bearer(key)).expect(202);
    expect((await waitForRun(t.app, key, run.body.id)).status).toBe('cancelled');
    const [hit] = await receiver.waitFor(1);
    const payload = new Webhook(created.body.secret).verify(hit.body, hit.headers as Record<string, string>) as any;
    expect(payload).toMatchObject({ type: 'run.cancelled', data: { runId: run.body.id, status: 'cancelled' } });
    await request(t.app).delete(`/v1/webhook-endpoints/${created.body.id}`).set(bearer(key)).expect(204);
  });

  it('refuses private, link-local and other non-public webhook URLs', async () => {
    const refused = [
      'https://10.1.2.3/hook',
      'https://172.16.0.9/hook',
      'https://192.168.1.10/hook',
      'https://169.254.169.254/latest/meta-data/',
      'https://100.64.0.1/hook',
      'https://0.0.0.0/hook',
      'https://[fe80::1]/hook',
      'https://[fd00:ec2::254]/hook',
      'https://[::ffff:10.0.0.1]/hook',
      'https://224.0.0.1/hook',
      'ftp://127.0.0.1/hook',
      'https://user:pw@127.0.0.1/hook',
      'not a url',
    ];
    for (const url of refused) {
      const res = await request(t.app).post('/v1/webhook-endpoints').set(bearer(key)).send({ url });
      expect(res.status, url).toBe(400);
      expect(res.body.errors[0].pointer).toBe('/url');
    }
  });
});

describe('webhooks without the loopback development setting', () => {
  let t: TestApp;
  let key: string;
  beforeAll(async () => {
    t = await startTestApp({ WEBHOOK_ALLOW_LOOPBACK: 'false' });
    key = (await createTenantWithKey(t.ctx)).apiKey;
  });
  afterAll(async () => t.close());

  it('refuses loopback addresses, hostnames that resolve to them, and plain http', async () => {
    for (const url of ['https://127.0.0.1/hook', 'https://[::1]/hook', 'https://localhost/hook', 'http://127.0.0.1/hook']) {
      const res = await request(t.app).post('/v1/webhook-endpoints').set(bearer(key)).send({ url });
      expect(res.status, url).toBe(400);
      expect(res.body.errors[0]).toMatchObject({ pointer: '/url' });
    }
  });
});
