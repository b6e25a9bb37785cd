// Events as the provider sends them: each kept in the account (`GET /v1/events`) and POSTed as JSON
// to every webhook endpoint that asked for its type, signed the way the provider documents so its
// SDK's `webhooks.constructEvent` verifies them: `Stripe-Signature: t=<unix seconds>,v1=<hex
// HMAC-SHA256 of "<t>.<body>" under the endpoint's whsec_ secret>`. A delivery that fails or is not
// answered 2xx is tried again with a growing delay, as the provider does (over days there, seconds here).
import { createHmac } from 'node:crypto';
import Stripe from 'stripe';
import { newId, nowOf, type Account } from './store';
import type { ProviderEvent, WebhookEndpoint } from './objects';

export interface EventRequest {
  id: string | null;
  idempotencyKey: string | null;
}

export interface Deliveries {
  /** Sends the event to the account's endpoints in the background. */
  deliver(account: Account, event: ProviderEvent): void;
  stop(): void;
}

const RETRY_DELAYS_MS = [500, 1000, 2000, 4000, 8000, 15000, 30000];

export function signatureHeader(payload: string, secret: string, timestamp = Math.floor(Date.now() / 1000)): string {
  const signature = createHmac('sha256', secret).update(`${timestamp}.${payload}`).digest('hex');
  return `t=${timestamp},v1=${signature}`;
}

export function recordEvent(account: Account, type: string, object: unknown, request: EventRequest | null, previous?: Record<string, unknown>): ProviderEvent {
  const event: ProviderEvent = {
    id: newId('evt'),
    object: 'event',
    api_version: Stripe.API_VERSION,
    created: nowOf(account),
    livemode: false,
    pending_webhooks: listeners(account, type).length,
    type,
    // A snapshot: later changes to the object do not reach an event already sent.
    data: { object: structuredClone(object), ...(previous ? { previous_attributes: previous } : {}) },
    request: { id: request?.id ?? null, idempotency_key: request?.idempotencyKey ?? null },
  };
  account.events.push(event);
  return event;
}

function listeners(account: Account, type: string): WebhookEndpoint[] {
  return Object.values(account.webhookEndpoints).filter((e) => e.status === 'enabled' && (e.enabled_events.includes('*') || e.enabled_events.includes(type)));
}

export function startDeliveries(log: (message: string) => void): Deliveries {
  const stopped = new AbortController();
  const wait = (ms: number) =>
    new Promise<void>((resolve) => {
      const timer = setTimeout(resolve, ms);
      stopped.signal.addEventListener('abort', () => {
        clearTimeout(timer);
        resolve();
      });
    });

  async function deliverTo(endpoint: WebhookEndpoint, event: ProviderEvent) {
    const payload = JSON.stringify(event, null, 2);
    for (let attempt = 0; !stopped.signal.aborted; attempt++) {
      try {
        const res = await fetch(endpoint.url, {
          method: 'POST',
          headers: { 'Content-Type': 'application/json; charset=utf-8', 'Stripe-Signature': signatureHeader(payload, endpoint.secret), 'User-Agent': 'fake-payments/1.0' },
          body: payload,
          signal: AbortSignal.any([stopped.signal, AbortSignal.timeout(10_000)]),
        });
        await res.arrayBuffer();
        if (res.ok) return;
        log(`${event.type} ${event.id} → ${endpoint.url}: answered ${res.status}`);
      } catch (err) {
        if (stopped.signal.aborted) return;
        log(`${event.type} ${event.id} → ${endpoint.url}: ${(err as Error).message}`);
      }
      const delay = RETRY_DELAYS_MS[attempt];
      if (delay === undefined) {
        log(`${event.type} ${event.id} → ${endpoint.url}: given up after ${attempt + 1} attempts`);
        return;
      }
      await wait(delay);
    }
  }

  return {
    deliver(account, event) {
      for (const endpoint of listeners(account, event.type)) void deliverTo(endpoint, event);
    },
    stop() {
      stopped.abort();
    },
  };
}
