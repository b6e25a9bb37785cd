// The provider's events at /hooks/payments: verified with the SDK's own signature check (tampered
// bodies, wrong secrets, old timestamps and missing headers refused, nothing recorded), processed
// once each however often and in whatever order they come; a failed renewal's grace period, the
// owners' e-mail and the fall back to the free plan with every record kept; operators' grants.
import request from 'supertest';
import type Stripe from 'stripe';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { endExpiredGracePeriods } from '../../../api/src/billing/grace-period';
import { eventually, startBillingApp, submitCard, TEST_CARDS, type BillingTestApp } from '../../support/fake-payments';
import { waitForMail } from '../../support/outbox';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

const DAY = 86_400;

async function subscribe(b: BillingTestApp, session: { cookie: string; csrf: string }, card: string, planId = 'field') {
  const checkout = await request(b.t.app).post('/v1/billing/checkout').set('Cookie', session.cookie).set('X-CSRF-Token', session.csrf).send({ planId }).expect(201);
  const paid = await submitCard(checkout.body.url, card);
  expect(paid.status).toBe(303);
}

const planOf = async (b: BillingTestApp, id: string) => (await b.t.ctx.db.query(`SELECT plan_id FROM tenants WHERE id = $1`, [id]))[0].plan_id as string;

describe('provider events, delivered by the test in its own order', () => {
  let b: BillingTestApp;
  let tenantId: string;
  let events: Stripe.Event[];

  const post = (payload: string, signature: string | null) => {
    const req = request(b.t.app).post('/hooks/payments').set('Content-Type', 'application/json');
    return (signature === null ? req : req.set('Stripe-Signature', signature)).send(payload);
  };
  const signed = (payload: string, opts: { secret?: string; timestamp?: number } = {}) =>
    b.provider.webhooks.generateTestHeaderString({ payload, secret: opts.secret ?? b.endpointSecret, timestamp: opts.timestamp });
  const recorded = async () => (await b.t.ctx.db.query(`SELECT count(*)::int AS n FROM billing_events`))[0].n as number;

  beforeAll(async () => {
    b = await startBillingApp({ deliver: false });
    ({ tenantId } = await createTenantWithKey(b.t.ctx, { plan: 'pilot' }));
    const owner = await createUserSession(b.t.ctx, b.t.app, { tenantId, role: 'owner' });
    await subscribe(b, owner, TEST_CARDS.accepted);
    events = (await b.provider.events.list({ limit: 100 })).data;
  });
  afterAll(async () => b?.close());

  it('refuses a tampered body, another secret, an old timestamp and a missing signature, recording nothing', async () => {
    const event = events.find((e) => e.type === 'invoice.paid')!;
    const payload = JSON.stringify(event);
    const tampered = payload.replace('"amount_paid":4900', '"amount_paid":1');
    expect(tampered).not.toBe(payload);
    const cases = [
      { what: 'tampered body', body: tampered, signature: signed(payload), detail: /does not match/ },
      { what: 'another secret', body: payload, signature: signed(payload, { secret: 'whsec_someoneelse0000000000' }), detail: /does not match/ },
      { what: 'ten minutes old', body: payload, signature: signed(payload, { timestamp: Math.floor(Date.now() / 1000) - 600 }), detail: /older than the tolerance/ },
      { what: 'no signature', body: payload, signature: null, detail: /missing/ },
      { what: 'garbage signature', body: payload, signature: 't=abc,v1=zz', detail: /does not match/ },
    ];
    for (const c of cases) {
      const res = await post(c.body, c.signature);
      expect(res.status, c.what).toBe(400);
      expect(res.headers['content-type'], c.what).toMatch(/^application\/problem\+json/);
      expect(res.body.detail, c.what).toMatch(c.detail);
    }
    expect(await recorded()).toBe(0);
    expect(await planOf(b, tenantId)).toBe('pilot');
  });

  it('processes the events in reverse order, each once, and again in any order as duplicates', async () => {
    const answers: Record<string, string> = {};
    for (const event of [...events].reverse()) {
      const payload = JSON.stringify(event);
      const res = await post(payload, signed(payload)).expect(200);
      answers[event.type] = res.body.outcome;
    }
    expect(answers['checkout.session.completed']).toBe('processed');
    expect(answers['invoice.paid']).toBe('processed');
    expect(answers['customer.created']).toBe('ignored');
    expect(await planOf(b, tenantId)).toBe('field');
    const count = await recorded();
    expect(count).toBe(events.length);

    const shuffled = [...events].sort(() => Math.random() - 0.5);
    for (const event of shuffled) {
      const payload = JSON.stringify(event);
      const res = await post(payload, signed(payload)).expect(200);
      expect(res.body.outcome, event.type).toBe('duplicate');
    }
    expect(await recorded()).toBe(count);
    const changes = await b.t.ctx.db.query(`SELECT count(*)::int AS n FROM audit_events WHERE action = 'plan-changed'`);
    expect(changes).toEqual([{ n: 1 }]);
  });

  it('processes an event sent twice at once exactly once', async () => {
    await b.advanceClock(32 * DAY);
    const renewal = (await b.provider.events.list({ type: 'invoice.paid', limit: 1 })).data[0]!;
    const payload = JSON.stringify(renewal);
    const both = await Promise.all([post(payload, signed(payload)), post(payload, signed(payload))]);
    expect(both.map((r) => r.body.outcome).sort()).toEqual(['duplicate', 'processed']);
  });
});

describe('a failed renewal, its grace period and the fall back to the free plan', () => {
  let b: BillingTestApp;
  let tenantId: string;
  let apiKey: string;
  let owner: { cookie: string; csrf: string; email: string };

  beforeAll(async () => {
    b = await startBillingApp({ env: { BILLING_GRACE_DAYS: '3' } });
    ({ tenantId, apiKey } = await createTenantWithKey(b.t.ctx, { plan: 'pilot' }));
    owner = await createUserSession(b.t.ctx, b.t.app, { tenantId, role: 'owner' });
  });
  afterAll(async () => b?.close());

  it('keeps the plan through the grace period, e-mails the owners, then falls back keeping every record', async () => {
    await subscribe(b, owner, TEST_CARDS.declinesLater);
    await eventually(async () => ((await planOf(b, tenantId)) === 'field' ? true : undefined), 'subscribed');
    const hook = await request(b.t.app).post('/v1/webhook-endpoints').set('Authorization', `Bearer ${apiKey}`).send({ url: 'http://127.0.0.1:9/hook' }).expect(201);

    const renewalDueFrom = Date.now();
    await b.advanceClock(32 * DAY);
    const graceEndsAt = await eventually(async () => (await b.t.ctx.db.query(`SELECT grace_ends_at FROM billing_accounts WHERE tenant_id = $1`, [tenantId]))[0]?.grace_ends_at ?? undefined, 'grace started');
    const seenAt = Date.now();
    // BILLING_GRACE_DAYS (3) from when Gridwright first saw the renewal fail — whichever of the provider's
    // events told it first, so between the clock's move and the test seeing the grace (bounds, not a
    // tolerance, so a busy machine passes).
    const graceStartedAt = graceEndsAt.getTime() - 3 * DAY * 1000;
    expect(graceStartedAt).toBeGreaterThanOrEqual(renewalDueFrom);
    expect(graceStartedAt).toBeLessThanOrEqual(seenAt);
    const [mail] = await waitForMail(b.t.ctx, { kind: 'billing-grace-started', to: owner.email });
    expect(mail!.subject).toContain('failed');
    expect(mail!.textBody).toContain(graceEndsAt.toISOString().slice(0, 10));
    expect(await planOf(b, tenantId)).toBe('field');
    const billing = await request(b.t.app).get('/v1/billing').set('Cookie', owner.cookie).expect(200);
    expect(billing.body).toMatchObject({ planSource: 'subscription', subscription: { status: 'past_due' }, graceEndsAt: graceEndsAt.toISOString() });
    const change = await request(b.t.app).put('/v1/tenant/plan').set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ planId: 'fleet' }).expect(409);
    expect(change.body.type).toBe('/problems/payment-overdue');

    expect(await endExpiredGracePeriods(b.t.ctx, new Date(graceEndsAt.getTime() - 1000))).toEqual([]);
    expect(await endExpiredGracePeriods(b.t.ctx, new Date(graceEndsAt.getTime() + 1000))).toEqual([tenantId]);
    expect(await planOf(b, tenantId)).toBe('pilot');
    await waitForMail(b.t.ctx, { kind: 'billing-lapsed-after-grace', to: owner.email });
    const subscriptions = await b.provider.subscriptions.list({ status: 'all' });
    expect(subscriptions.data.map((s) => s.status)).toEqual(['canceled']);

    // Nothing was deleted: the key still works and the endpoint is still there, above Pilot's cap or not.
    const hooks = await request(b.t.app).get('/v1/webhook-endpoints').set('Authorization', `Bearer ${apiKey}`).expect(200);
    expect(hooks.body.items.map((h: { id: string }) => h.id)).toContain(hook.body.id);
    // The provider's own event of the cancellation, arriving afterwards, changes nothing more.
    await eventually(async () => ((await b.t.ctx.db.query(`SELECT 1 FROM billing_events WHERE type = 'customer.subscription.deleted'`)).length ? true : undefined), 'deletion event');
    expect(await planOf(b, tenantId)).toBe('pilot');
  });

  it('ends the grace when the open invoice is paid on its page', async () => {
    const other = await createTenantWithKey(b.t.ctx, { plan: 'pilot' });
    const otherOwner = await createUserSession(b.t.ctx, b.t.app, { tenantId: other.tenantId, role: 'owner' });
    await subscribe(b, otherOwner, TEST_CARDS.declinesLater);
    await eventually(async () => ((await planOf(b, other.tenantId)) === 'field' ? true : undefined), 'subscribed');
    await b.advanceClock(32 * DAY);
    await eventually(async () => (await b.t.ctx.db.query(`SELECT grace_ends_at FROM billing_accounts WHERE tenant_id = $1`, [other.tenantId]))[0]?.grace_ends_at ?? undefined, 'grace started');
    const invoices = await request(b.t.app).get('/v1/billing/invoices').set('Cookie', otherOwner.cookie).expect(200);
    const open = invoices.body.items.find((i: { status: string }) => i.status === 'open');
    expect((await submitCard(open.hostedUrl, TEST_CARDS.accepted)).status).toBe(303);
    await eventually(async () => ((await b.t.ctx.db.query(`SELECT grace_ends_at FROM billing_accounts WHERE tenant_id = $1`, [other.tenantId]))[0].grace_ends_at === null ? true : undefined), 'grace ended');
    await waitForMail(b.t.ctx, { kind: 'billing-payment-recovered', to: otherOwner.email });
    expect(await planOf(b, other.tenantId)).toBe('field');
  });
});

describe("operators' grants", () => {
  let b: BillingTestApp;
  let tenantId: string;
  let owner: { cookie: string; csrf: string };
  let operator: { cookie: string; csrf: string };
  const asOperator = (method: 'get' | 'put' | 'delete' | 'patch', url: string) => request(b.t.app)[method](url).set('Cookie', operator.cookie).set('X-CSRF-Token', operator.csrf);

  beforeAll(async () => {
    b = await startBillingApp();
    ({ tenantId } = await createTenantWithKey(b.t.ctx, { plan: 'pilot' }));
    owner = await createUserSession(b.t.ctx, b.t.app, { tenantId, role: 'owner' });
    operator = await createUserSession(b.t.ctx, b.t.app, { tenantId, role: 'operator' });
  });
  afterAll(async () => b?.close());

  it('grants a plan without payment, audited, ahead of any subscription, and ends it', async () => {
    await subscribe(b, owner, TEST_CARDS.accepted);
    await eventually(async () => ((await planOf(b, tenantId)) === 'field' ? true : undefined), 'subscribed');
    const patched = await asOperator('patch', `/v1/admin/tenants/${tenantId}`).send({ planId: 'fleet' }).expect(409);
    expect(patched.body.type).toBe('/problems/plan-follows-subscription');

    const granted = await asOperator('put', `/v1/admin/tenants/${tenantId}/plan-grant`).send({ planId: 'fleet', reason: 'harbour pilot partnership' }).expect(200);
    expect(granted.body).toMatchObject({ planId: 'fleet', planSource: 'grant', grant: { planId: 'fleet', reason: 'harbour pilot partnership', grantedBy: expect.stringContaining('@') } });
    const owners = await request(b.t.app).put('/v1/tenant/plan').set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ planId: 'field' }).expect(409);
    expect(owners.body.type).toBe('/problems/plan-granted');
    // A provider event while the grant holds leaves the granted plan in place.
    await b.advanceClock(32 * DAY);
    await eventually(async () => ((await b.t.ctx.db.query(`SELECT 1 FROM billing_events WHERE type = 'invoice.paid' AND tenant_id = $1`, [tenantId])).length > 1 ? true : undefined), 'renewal');
    expect(await planOf(b, tenantId)).toBe('fleet');

    const ended = await asOperator('delete', `/v1/admin/tenants/${tenantId}/plan-grant`).expect(200);
    expect(ended.body).toMatchObject({ planId: 'field', planSource: 'subscription', grant: null });
    await asOperator('delete', `/v1/admin/tenants/${tenantId}/plan-grant`).expect(409);
    const audit = await b.t.ctx.db.query(`SELECT action, actor_email FROM audit_events WHERE tenant_id = $1 AND action LIKE 'plan-grant%' ORDER BY created_at`, [tenantId]);
    expect(audit.map((a: { action: string }) => a.action)).toEqual(['plan-granted', 'plan-grant-ended']);
    expect(audit.every((a: { actor_email: string | null }) => a.actor_email)).toBe(true);

    const standing = await asOperator('get', `/v1/admin/tenants/${tenantId}/billing`).expect(200);
    expect(standing.body).toMatchObject({ enabled: true, planSource: 'subscription', customerId: expect.stringMatching(/^cus_/), subscription: { status: 'active' } });
  });
});

describe('with billing off', () => {
  let t: TestApp;
  let tenantId: string;

  beforeAll(async () => {
    t = await startTestApp();
    ({ tenantId } = await createTenantWithKey(t.ctx, { plan: 'pilot' }));
  });
  afterAll(async () => t?.close());

  it('leaves plans to operators: an owner cannot change the plan, an operator can; events are refused', async () => {
    const owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    const operator = await createUserSession(t.ctx, t.app, { tenantId, role: 'operator' });
    const billing = await request(t.app).get('/v1/billing').set('Cookie', owner.cookie).expect(200);
    expect(billing.body).toMatchObject({ enabled: false, planId: 'pilot', planSource: 'free', prices: [], paymentMethod: null });
    const refused = await request(t.app).put('/v1/tenant/plan').set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ planId: 'fleet' }).expect(409);
    expect(refused.body.type).toBe('/problems/plans-set-by-operators');
    await request(t.app).post('/v1/billing/checkout').set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ planId: 'field' }).expect(409);
    const set = await request(t.app).put('/v1/tenant/plan').set('Cookie', operator.cookie).set('X-CSRF-Token', operator.csrf).set('X-Tenant-Id', tenantId).send({ planId: 'fleet' }).expect(200);
    expect(set.body.planId).toBe('fleet');
    const event = await request(t.app).post('/hooks/payments').set('Content-Type', 'application/json').set('Stripe-Signature', 't=1,v1=00').send('{}');
    expect(event.status).toBe(409);
    expect(event.body.type).toBe('/problems/billing-off');
  });
});
