// The payment provider for tests: the local fake, started once by the global setup (like PostgreSQL),
// with an account of its own per caller (a fresh secret key), reached through the provider's SDK.
import { randomBytes } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import Stripe from 'stripe';
import { inject } from 'vitest';
import { startTestApp, type TestApp } from './test-app';

export interface BillingTestApp {
  t: TestApp;
  /** The SDK on the same fake account the app uses, for what a test reads or does at the provider. */
  provider: Stripe;
  providerUrl: string;
  secretKey: string;
  /** The signing secret of the app's event endpoint at the fake. */
  endpointSecret: string;
  endpointId: string;
  appUrl: string;
  /** Moves the fake account's clock forward (renewals and cancellations at a period's end happen). */
  advanceClock(seconds: number): Promise<void>;
  close(): Promise<void>;
}

export function fakeProviderClient(secretKey: string): Stripe {
  const url = new URL(inject('payments').url);
  return new Stripe(secretKey, { host: url.hostname, port: Number(url.port), protocol: 'http', maxNetworkRetries: 0 });
}

/**
 * A real app listening on loopback with billing on, its events endpoint registered at the fake
 * through the provider's API. `deliver: false` leaves the endpoint disabled, so a test sends the
 * events itself (in the order it chooses).
 */
export async function startBillingApp(opts: { env?: Record<string, string>; deliver?: boolean } = {}): Promise<BillingTestApp> {
  const providerUrl = inject('payments').url;
  const secretKey = `sk_test_${randomBytes(12).toString('hex')}`;
  const provider = fakeProviderClient(secretKey);
  const endpoint = await provider.webhookEndpoints.create({ url: 'http://127.0.0.1:9/not-yet', enabled_events: ['*'] });
  const t = await startTestApp({ BILLING_SECRET_KEY: secretKey, BILLING_WEBHOOK_SECRET: endpoint.secret!, BILLING_API_URL: providerUrl, ...opts.env });
  const server: Server = await new Promise((resolve, reject) => {
    const s = t.app.listen(0, '127.0.0.1', () => resolve(s));
    s.on('error', reject);
  });
  const appUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  // The app's address is known once it listens; links it hands out (the checkout's way back) use it.
  t.ctx.config.publicUrl = appUrl;
  await provider.webhookEndpoints.update(endpoint.id, { url: `${appUrl}/hooks/payments`, disabled: opts.deliver === false });
  return {
    t,
    provider,
    providerUrl,
    secretKey,
    endpointSecret: endpoint.secret!,
    endpointId: endpoint.id,
    appUrl,
    async advanceClock(seconds) {
      const res = await fetch(`${providerUrl}/fake/clock/advance`, {
        method: 'POST',
        headers: { Authorization: `Bearer ${secretKey}`, 'Content-Type': 'application/x-www-form-urlencoded' },
        body: `seconds=${seconds}`,
      });
      if (!res.ok) throw new Error(`advancing the fake clock: ${res.status} ${await res.text()}`);
    },
    async close() {
      await provider.webhookEndpoints.del(endpoint.id);
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await t.close();
    },
  };
}

export const TEST_CARDS = {
  accepted: '4242 4242 4242 4242',
  declined: '4000 0000 0000 0002',
  /** Accepted when entered; every later charge (a renewal, an upgrade) is declined. */
  declinesLater: '4000 0000 0000 0341',
} as const;

/** Submits the card form of a hosted page (checkout or invoice) as a browser would; answers the status and where it redirects. */
export async function submitCard(pageUrl: string, number: string): Promise<{ status: number; location: string | null; html: string }> {
  const res = await fetch(pageUrl, {
    method: 'POST',
    body: new URLSearchParams({ name: 'Ines Quarry', number, expiry: '12/34', cvc: '123' }),
    redirect: 'manual',
  });
  return { status: res.status, location: res.headers.get('location'), html: await res.text() };
}

/** Polls `check` until it returns a value other than undefined (events arrive asynchronously). */
export async function eventually<T>(check: () => Promise<T | undefined>, what: string, timeoutMs = 20_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value !== undefined) return value;
    if (Date.now() > deadline) throw new Error(`${what}: not within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}
