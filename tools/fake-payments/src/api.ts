// The subset of the provider's HTTP API that Gridwright calls, as its SDK calls it: form-encoded
// bodies with bracketed keys (`items[0][price]=…`), the secret key as a bearer token, an
// Idempotency-Key on every POST (the first answer is kept and replayed; the same key with other
// parameters is an idempotency_error), lists as `{ object: 'list', data, has_more }`, and errors as
// `{ error: { type, code, message, param } }`.
import { createHash, randomBytes } from 'node:crypto';
import express, { type NextFunction, type Request, type Response, type Router } from 'express';
import { invalid, missing, ProviderError } from './errors';
import type { Ledger } from './ledger';
import { list, type CheckoutSession, type Customer, type Invoice, type WebhookEndpoint } from './objects';
import { isSecretKey, newId, nowOf, type Account } from './store';

type Params = Record<string, any>;

declare module 'express-serve-static-core' {
  interface Request {
    account?: Account;
  }
}

const account = (req: Request) => req.account!;
const params = (req: Request): Params => (req.method === 'GET' || req.method === 'DELETE' ? (req.query as Params) : (req.body ?? {}));
const requestOf = (req: Request) => ({ id: String(req.headers['x-request-id'] ?? newId('req')), idempotencyKey: (req.get('idempotency-key') as string | undefined) ?? null });

function text(p: Params, name: string, required = false): string | undefined {
  const value = p[name];
  if (value === undefined || value === '') {
    if (required) throw new ProviderError(400, 'invalid_request_error', `Missing required param: ${name}.`, { code: 'parameter_missing', param: name });
    return undefined;
  }
  if (typeof value !== 'string') throw invalid(name, `Invalid string: ${name}`);
  return value;
}

function flag(p: Params, name: string): boolean | undefined {
  const value = text(p, name);
  if (value === undefined) return undefined;
  if (value !== 'true' && value !== 'false') throw invalid(name, `Invalid boolean: ${value}`);
  return value === 'true';
}

function whole(p: Params, name: string, fallback: number, max: number): number {
  const value = text(p, name);
  if (value === undefined) return fallback;
  if (!/^\d+$/.test(value) || Number(value) > max) throw invalid(name, `Invalid integer: ${value}`);
  return Number(value);
}

function stringMap(p: Params, name: string): Record<string, string> | undefined {
  const value = p[name];
  if (value === undefined || value === '') return undefined;
  if (typeof value !== 'object' || Array.isArray(value)) throw invalid(name, `Invalid hash: ${name}`);
  return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, String(v)]));
}

function arrayOf(p: Params, name: string): unknown[] | undefined {
  const value = p[name];
  if (value === undefined) return undefined;
  if (Array.isArray(value)) return value;
  if (typeof value === 'object') return Object.values(value);
  return [value];
}

/** A page of `items` (newest first), after the id `starting_after` when given. */
function page<T extends { id: string }>(items: T[], p: Params, url: string) {
  const limit = whole(p, 'limit', 10, 100) || 10;
  const after = text(p, 'starting_after');
  const start = after ? items.findIndex((i) => i.id === after) + 1 : 0;
  if (after && start === 0) throw invalid('starting_after', `No such object: '${after}'`);
  return list(items.slice(start, start + limit), url, start + limit < items.length);
}

const newestFirst = <T extends { created: number }>(items: T[]) => items.map((item, i) => ({ item, i })).sort((a, b) => b.item.created - a.item.created || b.i - a.i).map((x) => x.item);

function authenticate(ledger: Ledger) {
  return (req: Request, _res: Response, next: NextFunction) => {
    const header = req.get('authorization') ?? '';
    const bearer = /^Bearer (.+)$/.exec(header)?.[1];
    const basic = /^Basic (.+)$/.exec(header)?.[1];
    const key = bearer ?? (basic ? Buffer.from(basic, 'base64').toString('utf8').split(':')[0] : undefined);
    if (!key || !isSecretKey(key)) {
      return next(new ProviderError(401, 'invalid_request_error', 'Invalid API Key provided. This fake takes any test key of the form sk_test_… (at least 8 characters after the prefix).'));
    }
    req.account = ledger.store.account(key);
    next();
  };
}

/** Replays the first answer to an Idempotency-Key; refuses the key with other parameters. */
function idempotent(ledger: Ledger) {
  return (req: Request, res: Response, next: NextFunction) => {
    const key = req.get('idempotency-key');
    if (req.method !== 'POST' || !key) return next();
    const store = account(req).idempotency;
    const fingerprint = createHash('sha256').update(`${req.method} ${req.path} ${JSON.stringify(req.body ?? {})}`).digest('hex');
    const earlier = store[key];
    if (earlier) {
      if (earlier.fingerprint !== fingerprint) {
        return next(new ProviderError(400, 'idempotency_error', `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${key}' if you meant to execute a different request.`));
      }
      return res.status(earlier.status).set('Idempotent-Replayed', 'true').json(earlier.body);
    }
    const send = res.json.bind(res);
    res.json = (body: unknown) => {
      // Errors the server might not repeat (a 5xx) are not kept, so a retry runs again.
      if (res.statusCode < 500) store[key] = { fingerprint, status: res.statusCode, body };
      ledger.store.changed();
      return send(body);
    };
    next();
  };
}

function customerOf(a: Account, id: string | undefined, param = 'customer'): Customer {
  const customer = id ? a.customers[id] : undefined;
  if (!customer) throw missing('customer', id ?? '', param);
  return customer;
}

function expandCustomer(a: Account, customer: Customer, expand: unknown[] | undefined) {
  if (!expand?.includes('invoice_settings.default_payment_method')) return customer;
  const id = customer.invoice_settings.default_payment_method;
  return { ...customer, invoice_settings: { ...customer.invoice_settings, default_payment_method: id ? (a.paymentMethods[id] ?? null) : null } };
}

const sessionView = ({ _items: _i, _subscriptionMetadata: _m, ...session }: CheckoutSession) => session;
const endpointView = ({ secret: _s, ...endpoint }: WebhookEndpoint) => endpoint;

export function providerApi(ledger: Ledger): Router {
  const r = express.Router({ caseSensitive: true, strict: true });
  r.use(['/v1', '/fake'], express.urlencoded({ extended: true, limit: '256kb' }), authenticate(ledger), idempotent(ledger));

  r.get('/v1/prices', (req, res) => {
    const p = params(req);
    const keys = arrayOf(p, 'lookup_keys')?.map(String);
    const active = flag(p, 'active');
    const prices = Object.values(account(req).prices).filter((x) => (!keys || (x.lookup_key !== null && keys.includes(x.lookup_key))) && (active === undefined || x.active === active));
    res.json(page(prices, p, '/v1/prices'));
  });

  r.get('/v1/prices/:id', (req, res) => {
    const price = account(req).prices[req.params.id as string];
    if (!price) throw missing('price', req.params.id as string);
    res.json(price);
  });

  r.post('/v1/customers', (req, res) => {
    const p = params(req);
    const customer: Customer = {
      id: newId('cus'),
      object: 'customer',
      created: nowOf(account(req)),
      email: text(p, 'email') ?? null,
      name: text(p, 'name') ?? null,
      metadata: stringMap(p, 'metadata') ?? {},
      livemode: false,
      invoice_settings: { default_payment_method: null },
    };
    account(req).customers[customer.id] = customer;
    ledger.emit(account(req), 'customer.created', customer, requestOf(req));
    res.json(customer);
  });

  r.get('/v1/customers/:id', (req, res) => {
    const customer = customerOf(account(req), req.params.id as string, 'id');
    res.json(expandCustomer(account(req), customer, arrayOf(params(req), 'expand')));
  });

  r.post('/v1/customers/:id', (req, res) => {
    const p = params(req);
    const customer = customerOf(account(req), req.params.id as string, 'id');
    const previous: Record<string, unknown> = {};
    for (const field of ['email', 'name'] as const) {
      const value = text(p, field);
      if (value !== undefined) {
        previous[field] = customer[field];
        customer[field] = value;
      }
    }
    const metadata = stringMap(p, 'metadata');
    if (metadata) {
      previous.metadata = customer.metadata;
      customer.metadata = { ...customer.metadata, ...metadata };
    }
    ledger.emit(account(req), 'customer.updated', customer, requestOf(req), previous);
    res.json(customer);
  });

  r.get('/v1/payment_methods/:id', (req, res) => {
    const method = account(req).paymentMethods[req.params.id as string];
    if (!method) throw missing('payment_method', req.params.id as string);
    res.json(method);
  });

  r.post('/v1/checkout/sessions', (req, res) => {
    const a = account(req);
    const p = params(req);
    const mode = text(p, 'mode', true);
    if (mode !== 'subscription') throw invalid('mode', 'This fake sells subscriptions only: mode must be "subscription".');
    const customer = customerOf(a, text(p, 'customer', true));
    const lineItems = arrayOf(p, 'line_items') ?? [];
    if (lineItems.length === 0) throw new ProviderError(400, 'invalid_request_error', 'Missing required param: line_items.', { code: 'parameter_missing', param: 'line_items' });
    const items = lineItems.map((raw, i) => {
      const item = (raw ?? {}) as Params;
      const price = ledger.price(a, text(item, 'price', true)!);
      const quantity = text(item, 'quantity');
      if (price.recurring.usage_type === 'metered' && quantity !== undefined) throw invalid(`line_items[${i}][quantity]`, 'Quantity cannot be set on a metered price.');
      return { price: price.id, ...(price.recurring.usage_type === 'licensed' ? { quantity: quantity === undefined ? 1 : whole(item, 'quantity', 1, 1000) } : {}) };
    });
    const now = nowOf(a);
    const id = newId('cs_test');
    const session: CheckoutSession = {
      id,
      object: 'checkout.session',
      created: now,
      expires_at: now + 24 * 3600,
      livemode: false,
      mode: 'subscription',
      status: 'open',
      payment_status: 'unpaid',
      client_reference_id: text(p, 'client_reference_id') ?? null,
      success_url: text(p, 'success_url', true)!,
      cancel_url: text(p, 'cancel_url') ?? null,
      url: `${ledger.baseUrl}/pay/checkout/${id}`,
      metadata: stringMap(p, 'metadata') ?? {},
      currency: ledger.price(a, items[0]!.price).currency,
      amount_total: null,
      customer: customer.id,
      subscription: null,
      invoice: null,
      _items: items,
      _subscriptionMetadata: stringMap((p.subscription_data ?? {}) as Params, 'metadata') ?? {},
    };
    a.checkoutSessions[id] = session;
    ledger.store.changed();
    res.json(sessionView(session));
  });

  r.get('/v1/checkout/sessions/:id', (req, res) => {
    const session = account(req).checkoutSessions[req.params.id as string];
    if (!session) throw missing('checkout.session', req.params.id as string);
    res.json(sessionView(session));
  });

  r.post('/v1/checkout/sessions/:id/expire', (req, res) => {
    const session = account(req).checkoutSessions[req.params.id as string];
    if (!session) throw missing('checkout.session', req.params.id as string);
    if (session.status !== 'open') throw invalid('session', `Only an open session can be expired; this one is ${session.status}.`);
    session.status = 'expired';
    ledger.emit(account(req), 'checkout.session.expired', sessionView(session), requestOf(req));
    res.json(sessionView(session));
  });

  r.get('/v1/subscriptions', (req, res) => {
    const p = params(req);
    const customer = text(p, 'customer');
    const status = text(p, 'status');
    const subscriptions = newestFirst(Object.values(account(req).subscriptions)).filter(
      (s) => (!customer || s.customer === customer) && (status === 'all' || (status ? s.status === status : s.status !== 'canceled')),
    );
    res.json(page(subscriptions, p, '/v1/subscriptions'));
  });

  const subscriptionOf = (req: Request) => {
    const subscription = account(req).subscriptions[req.params.id as string];
    if (!subscription) throw missing('subscription', req.params.id as string);
    return subscription;
  };

  r.get('/v1/subscriptions/:id', (req, res) => {
    res.json(subscriptionOf(req));
  });

  r.post('/v1/subscriptions/:id', (req, res) => {
    const p = params(req);
    const items = arrayOf(p, 'items')?.map((raw) => ({ id: text((raw ?? {}) as Params, 'id', true), price: text((raw ?? {}) as Params, 'price') }));
    const updated = ledger.updateSubscription(
      account(req),
      subscriptionOf(req),
      { items, proration_behavior: text(p, 'proration_behavior'), payment_behavior: text(p, 'payment_behavior'), cancel_at_period_end: flag(p, 'cancel_at_period_end'), metadata: stringMap(p, 'metadata') },
      requestOf(req),
    );
    res.json(updated);
  });

  r.delete('/v1/subscriptions/:id', (req, res) => {
    res.json(ledger.cancelSubscription(account(req), subscriptionOf(req), requestOf(req)));
  });

  r.get('/v1/invoices', (req, res) => {
    const p = params(req);
    const customer = text(p, 'customer');
    const subscription = text(p, 'subscription');
    const status = text(p, 'status');
    const invoices = newestFirst(Object.values(account(req).invoices)).filter(
      (i: Invoice) => (!customer || i.customer === customer) && (!subscription || i.parent?.subscription_details.subscription === subscription) && (!status || i.status === status),
    );
    res.json(page(invoices, p, '/v1/invoices'));
  });

  r.post('/v1/invoices/create_preview', (req, res) => {
    const a = account(req);
    const p = params(req);
    const customer = customerOf(a, text(p, 'customer', true));
    const id = text(p, 'subscription', true)!;
    const subscription = a.subscriptions[id];
    if (!subscription || subscription.customer !== customer.id) throw missing('subscription', id, 'subscription');
    if (subscription.status === 'canceled') throw new ProviderError(404, 'invalid_request_error', 'No upcoming invoices for a canceled subscription.', { code: 'invoice_upcoming_none' });
    res.json(ledger.preview(a, subscription));
  });

  r.get('/v1/invoices/:id', (req, res) => {
    const invoice = account(req).invoices[req.params.id as string];
    if (!invoice) throw missing('invoice', req.params.id as string);
    res.json(invoice);
  });

  r.post('/v1/billing/meter_events', (req, res) => {
    const a = account(req);
    const p = params(req);
    const eventName = text(p, 'event_name', true)!;
    if (!Object.values(a.meters).some((m) => m.event_name === eventName)) throw invalid('event_name', `No active meter found for event name '${eventName}'.`);
    const payload = stringMap(p, 'payload') ?? {};
    customerOf(a, payload.stripe_customer_id, 'payload[stripe_customer_id]');
    if (!/^\d+(\.\d+)?$/.test(payload.value ?? '')) throw invalid('payload[value]', 'The value must be a non-negative number.');
    const identifier = text(p, 'identifier') ?? newId('mev');
    const now = nowOf(a);
    const timestamp = text(p, 'timestamp') === undefined ? now : whole(p, 'timestamp', now, 1e11);
    // The provider keeps an identifier unique, so a report sent twice counts once.
    const earlier = a.meterEvents.find((e) => e.identifier === identifier);
    if (earlier) return res.json(earlier);
    const event = { object: 'billing.meter_event' as const, created: now, event_name: eventName, identifier, livemode: false, payload, timestamp };
    a.meterEvents.push(event);
    ledger.store.changed();
    res.json(event);
  });

  r.get('/v1/events', (req, res) => {
    const p = params(req);
    const type = text(p, 'type');
    const events = [...account(req).events].reverse().filter((e) => !type || e.type === type);
    res.json(page(events, p, '/v1/events'));
  });

  r.get('/v1/events/:id', (req, res) => {
    const event = account(req).events.find((e) => e.id === req.params.id);
    if (!event) throw missing('event', req.params.id as string);
    res.json(event);
  });

  r.post('/v1/webhook_endpoints', (req, res) => {
    const p = params(req);
    const url = text(p, 'url', true)!;
    if (!/^https?:\/\//.test(url)) throw invalid('url', 'Invalid URL: must be http or https.');
    const events = arrayOf(p, 'enabled_events')?.map(String);
    if (!events?.length) throw new ProviderError(400, 'invalid_request_error', 'Missing required param: enabled_events.', { code: 'parameter_missing', param: 'enabled_events' });
    const endpoint: WebhookEndpoint = {
      id: newId('we'),
      object: 'webhook_endpoint',
      created: nowOf(account(req)),
      url,
      enabled_events: events,
      status: 'enabled',
      livemode: false,
      metadata: stringMap(p, 'metadata') ?? {},
      description: text(p, 'description') ?? null,
      secret: `whsec_${randomBytes(24).toString('base64url')}`,
    };
    account(req).webhookEndpoints[endpoint.id] = endpoint;
    ledger.store.changed();
    res.json(endpoint);
  });

  r.post('/v1/webhook_endpoints/:id', (req, res) => {
    const p = params(req);
    const endpoint = account(req).webhookEndpoints[req.params.id as string];
    if (!endpoint) throw missing('webhook_endpoint', req.params.id as string);
    const url = text(p, 'url');
    if (url !== undefined) {
      if (!/^https?:\/\//.test(url)) throw invalid('url', 'Invalid URL: must be http or https.');
      endpoint.url = url;
    }
    const events = arrayOf(p, 'enabled_events')?.map(String);
    if (events?.length) endpoint.enabled_events = events;
    const disabled = flag(p, 'disabled');
    if (disabled !== undefined) endpoint.status = disabled ? 'disabled' : 'enabled';
    ledger.store.changed();
    res.json(endpointView(endpoint));
  });

  r.get('/v1/webhook_endpoints', (req, res) => {
    res.json(page(Object.values(account(req).webhookEndpoints).map(endpointView), params(req), '/v1/webhook_endpoints'));
  });

  r.delete('/v1/webhook_endpoints/:id', (req, res) => {
    const endpoint = account(req).webhookEndpoints[req.params.id as string];
    if (!endpoint) throw missing('webhook_endpoint', req.params.id as string);
    delete account(req).webhookEndpoints[endpoint.id];
    ledger.store.changed();
    res.json({ id: endpoint.id, object: 'webhook_endpoint', deleted: true });
  });

  // Not the provider's API: moves this account's clock forward, renewing (or ending) every
  // subscription whose period ends on the way, so a renewal can be seen without waiting a month.
  r.post('/fake/clock/advance', (req, res) => {
    const a = account(req);
    const seconds = whole(params(req), 'seconds', 0, 10 * 366 * 24 * 3600);
    a.clockOffsetSeconds += seconds;
    ledger.renewDue(a);
    res.json({ now: nowOf(a) });
  });

  r.use(['/v1', '/fake'], (req, _res, next) => {
    next(new ProviderError(404, 'invalid_request_error', `Unrecognized request URL (${req.method}: ${req.originalUrl}).`));
  });
  return r;
}
