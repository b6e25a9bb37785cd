// OWASP API Security Top 10 (2023), API10 Unsafe Consumption of APIs: what a webhook receiver
// answers is read only up to a size limit and within a deadline, and is never parsed into state —
// a body that looks like a command changes nothing.
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { guardedPost } from '../../api/src/services/ssrf-guard';
import type { TestApp } from '../support/test-app';
import { startWebhookReceiver } from '../support/webhook-receiver';
import { startDeliveryApp, type DeliveryApp } from './support/delivery-app';

async function hostileReceiver(handler: http.RequestListener) {
  const server = http.createServer(handler);
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}/hook`,
    close: () => new Promise<void>((r) => {
      server.closeAllConnections();
      server.close(() => r());
    }),
  };
}

const policy = { allowLoopback: true, headers: { 'content-type': 'application/json' }, timeoutMs: 800, maxResponseBytes: 1024 };

describe('API10 unsafe consumption of APIs', () => {
  it('stops reading an endless answer at the size limit', async () => {
    const r = await hostileReceiver((_req, res) => {
      res.writeHead(200, { 'content-type': 'application/json' });
      const chunk = Buffer.alloc(64 * 1024, 'x');
      const pump = () => {
        while (res.write(chunk));
        res.once('drain', pump);
      };
      pump();
      res.on('error', () => {});
    });
    try {
      const got = await guardedPost(r.url, '{}', policy);
      expect(got).toMatchObject({ statusCode: 200, truncated: true, bytesRead: 1024 });
    } finally {
      await r.close();
    }
  });

  it('gives up on a receiver that sends headers and then drips its body forever', async () => {
    const r = await hostileReceiver((_req, res) => {
      res.writeHead(200);
      const timer = setInterval(() => res.write('.'), 100);
      res.on('close', () => clearInterval(timer));
    });
    try {
      await expect(guardedPost(r.url, '{}', policy)).rejects.toThrow(/within 800 ms/);
    } finally {
      await r.close();
    }
  });

  it('gives up on a receiver that never answers', async () => {
    const r = await hostileReceiver(() => {});
    try {
      await expect(guardedPost(r.url, '{}', policy)).rejects.toThrow(/within 800 ms/);
    } finally {
      await r.close();
    }
  });

  describe('through a delivery', () => {
    let app: DeliveryApp;
    let t: TestApp;
    let apiKey: string;
    beforeAll(async () => {
      app = await startDeliveryApp();
      ({ t, apiKey } = app);
    });
    afterAll(async () => app?.close());

    it('ignores a receiver body that looks like instructions: the endpoint and the delivery log hold only facts', async () => {
      const receiver = await startWebhookReceiver();
      const instructions = JSON.stringify({ url: 'https://169.254.169.254/', enabled: false, secret: 'whsec_attacker', events: [], status: 'cancelled' });
      receiver.script({ status: 200, headers: { 'content-type': 'application/json' }, body: instructions });
      try {
        const created = await request(t.app).post('/v1/webhook-endpoints').set('Authorization', `Bearer ${apiKey}`).send({ url: receiver.url });
        expect(created.status).toBe(201);
        const before = await request(t.app).get(`/v1/webhook-endpoints/${created.body.id}`).set('Authorization', `Bearer ${apiKey}`);
        await request(t.app).post(`/v1/webhook-endpoints/${created.body.id}/test`).set('Authorization', `Bearer ${apiKey}`);
        await receiver.waitFor(1);
        let log: request.Response | undefined;
        for (let i = 0; i < 100; i++) {
          log = await request(t.app).get(`/v1/webhook-endpoints/${created.body.id}/deliveries`).set('Authorization', `Bearer ${apiKey}`);
          if (log.body.items?.[0]?.status === 'succeeded') break;
          await new Promise((r) => setTimeout(r, 100));
        }
        expect(log!.body.items[0].status).toBe('succeeded');
        expect(log!.text).not.toContain('whsec_attacker');
        expect(log!.text).not.toContain('169.254.169.254');
        const after = await request(t.app).get(`/v1/webhook-endpoints/${created.body.id}`).set('Authorization', `Bearer ${apiKey}`);
        expect({ ...after.body, lastDeliveryAt: undefined, consecutiveFailures: undefined }).toEqual({ ...before.body, lastDeliveryAt: undefined, consecutiveFailures: undefined });
        expect(after.body.enabled).toBe(true);
      } finally {
        await receiver.close();
      }
    });
  });
});
