// The whole billing flow against the local fake of the payment provider, through the provider's SDK
// and its signed events: checkout (a declined card, then an accepted one), the plan following the
// subscription, an upgrade charged at once, a downgrade at the period's end, usage above the plan
// billed as metered usage, cancellation and resumption, owners only, and nothing about cards stored.
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { assertRunAllowed, recordRunUsage } from '../../../api/src/services/quotas';
import { eventually, startBillingApp, submitCard, TEST_CARDS, type BillingTestApp } from '../../support/fake-payments';
import { createTenantWithKey, createUserSession } from '../../support/tenants';

const DAY = 86_400;

let b: BillingTestApp;
let tenantId: string;
let owner: { cookie: string; csrf: string; email: string };

const asOwner = (method: 'get' | 'post' | 'put', url: string) => request(b.t.app)[method](url).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);
const planOf = async (id: string) => (await b.t.ctx.db.query(`SELECT plan_id FROM tenants WHERE id = $1`, [id]))[0].plan_id as string;
const untilPlan = (id: string, planId: string) => eventually(async () => ((await planOf(id)) === planId ? true : undefined), `tenant on ${planId}`);

describe('billing through the payment provider', () => {
  beforeAll(async () => {
    b = await startBillingApp();
    ({ tenantId } = await createTenantWithKey(b.t.ctx, { plan: 'pilot' }));
    owner = await createUserSession(b.t.ctx, b.t.app, { tenantId, role: 'owner' });
  });
  afterAll(async () => b?.close());

  it('shows the prices on offer and no subscription before anything is bought', async () => {
    const res = await asOwner('get', '/v1/billing').expect(200);
    expect(res.body).toMatchObject({ enabled: true, planId: 'pilot', planSource: 'free', freePlanId: 'pilot', subscription: null, paymentMethod: null, grant: null });
    expect(res.body.prices).toEqual([
      { planId: 'field', amount: 4900, currency: 'eur', interval: 'month' },
      { planId: 'fleet', amount: 24900, currency: 'eur', interval: 'month' },
    ]);
    expect(res.body.usagePrice).toEqual({ amount: 5, currency: 'eur', perSolverSeconds: 60 });
  });

  it('refuses a plan that is not for sale, and a plan change that has to be bought first', async () => {
    const free = await asOwner('post', '/v1/billing/checkout').send({ planId: 'pilot' }).expect(400);
    expect(free.body.errors[0].pointer).toBe('/planId');
    const unknown = await asOwner('post', '/v1/billing/checkout').send({ planId: 'harbour' }).expect(400);
    expect(unknown.body.errors[0].pointer).toBe('/planId');
    const change = await asOwner('put', '/v1/tenant/plan').send({ planId: 'field' }).expect(409);
    expect(change.body.type).toBe('/problems/checkout-required');
  });

  it('buys Field through the hosted checkout: a declined card changes nothing, an accepted one does once its events arrive', async () => {
    const checkout = await asOwner('post', '/v1/billing/checkout').send({ planId: 'field' }).expect(201);
    expect(checkout.body.url).toMatch(new RegExp(`^${b.providerUrl}/pay/checkout/cs_test_`));
    const page = await fetch(checkout.body.url);
    expect(await page.text()).toContain('Pay and subscribe');

    const declined = await submitCard(checkout.body.url, TEST_CARDS.declined);
    expect(declined.status).toBe(402);
    expect(declined.html).toContain('Your card was declined.');
    expect(await planOf(tenantId)).toBe('pilot');

    const paid = await submitCard(checkout.body.url, TEST_CARDS.accepted);
    expect(paid.status).toBe(303);
    expect(paid.location).toBe(`${b.t.ctx.config.publicUrl}/billing?checkout=complete`);
    await untilPlan(tenantId, 'field');

    const billing = await asOwner('get', '/v1/billing').expect(200);
    expect(billing.body).toMatchObject({ planId: 'field', planSource: 'subscription', subscription: { status: 'active', planId: 'field', cancelAtPeriodEnd: false, scheduledPlanId: null } });
    expect(billing.body.paymentMethod).toEqual({ brand: 'visa', last4: '4242', expMonth: 12, expYear: 2034 });
    const tenant = await asOwner('get', '/v1/tenant').expect(200);
    expect(tenant.body.limits.monthlySolverSeconds).toBe(72000);
    const processed = await b.t.ctx.db.query(`SELECT type FROM billing_events WHERE tenant_id = $1`, [tenantId]);
    expect(processed.map((e: { type: string }) => e.type)).toEqual(expect.arrayContaining(['invoice.paid', 'checkout.session.completed']));
    const audit = await b.t.ctx.db.query(`SELECT details FROM audit_events WHERE tenant_id = $1 AND action = 'plan-changed'`, [tenantId]);
    expect(audit).toEqual([{ details: expect.objectContaining({ from: 'pilot', to: 'field', source: 'billing' }) }]);
  });

  it('lists the invoice with its page at the provider', async () => {
    const invoices = await asOwner('get', '/v1/billing/invoices').expect(200);
    expect(invoices.body.items).toHaveLength(1);
    expect(invoices.body.items[0]).toMatchObject({ status: 'paid', total: 4900, amountPaid: 4900, currency: 'eur', reason: 'subscription_create' });
    const page = await fetch(invoices.body.items[0].hostedUrl);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Paid');
  });

  it('upgrades at once, charging the rest of the period now', async () => {
    const res = await asOwner('put', '/v1/tenant/plan').send({ planId: 'fleet' }).expect(200);
    expect(res.body.planId).toBe('fleet');
    const invoices = await asOwner('get', '/v1/billing/invoices').expect(200);
    expect(invoices.body.items[0]).toMatchObject({ status: 'paid', reason: 'subscription_update' });
    // The proration is the price difference for what is left of the period, so less than a month's difference.
    expect(invoices.body.items[0].total).toBeGreaterThan(0);
    expect(invoices.body.items[0].total).toBeLessThanOrEqual(24900 - 4900);
  });

  it('downgrades at the end of the period, keeping what was paid for until then', async () => {
    const res = await asOwner('put', '/v1/tenant/plan').send({ planId: 'field' }).expect(200);
    expect(res.body.planId).toBe('fleet');
    const billing = await asOwner('get', '/v1/billing').expect(200);
    expect(billing.body.subscription).toMatchObject({ planId: 'field', scheduledPlanId: 'field', scheduledAt: billing.body.subscription.currentPeriodEnd });

    await b.advanceClock(32 * DAY);
    await untilPlan(tenantId, 'field');
    const after = await asOwner('get', '/v1/billing').expect(200);
    expect(after.body.subscription).toMatchObject({ planId: 'field', scheduledPlanId: null, scheduledAt: null });
    const invoices = await asOwner('get', '/v1/billing/invoices').expect(200);
    expect(invoices.body.items[0]).toMatchObject({ status: 'paid', reason: 'subscription_cycle', total: 4900 });
  });

  it('bills solver-seconds above the allowance as metered usage instead of refusing runs, and shows them on the next invoice', async () => {
    const allowance = 72000;
    await recordRunUsage(b.t.ctx, { tenantId, runId: randomUUID(), solverSeconds: allowance + 125.4, steps: 96, units: 2, endedAt: new Date() });
    const reports = await b.t.ctx.db.query(`SELECT solver_seconds, reported_at FROM billing_usage_reports WHERE tenant_id = $1`, [tenantId]);
    expect(reports).toEqual([{ solver_seconds: 125, reported_at: expect.any(Date) }]);
    // Recording the same totals again reports nothing more.
    await recordRunUsage(b.t.ctx, { tenantId, runId: randomUUID(), solverSeconds: 0, steps: 96, units: 2, endedAt: new Date() });
    expect(await b.t.ctx.db.query(`SELECT count(*)::int AS n FROM billing_usage_reports WHERE tenant_id = $1`, [tenantId])).toEqual([{ n: 1 }]);
    // Over the allowance and still allowed to submit: the rest is billed.
    await b.t.ctx.db.transaction((m) => assertRunAllowed(b.t.ctx, m, tenantId, { steps: 96, units: 2 }));

    const preview = await asOwner('get', '/v1/billing/upcoming-invoice').expect(200);
    // 125 s in started minutes at 5 cents: ceil(125 / 60) = 3 → 15 cents, beside the plan's 49 €.
    expect(preview.body.lines.map((l: { amount: number; quantity: number }) => [l.quantity, l.amount])).toEqual(
      expect.arrayContaining([
        [1, 4900],
        [125, 15],
      ]),
    );
    expect(preview.body.total).toBe(4915);
  });

  it('cancels at the end of the period, takes it back, and falls back to the free plan when a cancellation takes effect', async () => {
    const cancelled = await asOwner('post', '/v1/billing/subscription/cancel').expect(200);
    expect(cancelled.body.subscription).toMatchObject({ cancelAtPeriodEnd: true, scheduledPlanId: 'pilot' });
    expect(cancelled.body.planId).toBe('field');
    const resumed = await asOwner('post', '/v1/billing/subscription/resume').expect(200);
    expect(resumed.body.subscription).toMatchObject({ cancelAtPeriodEnd: false, scheduledPlanId: null });

    await asOwner('put', '/v1/tenant/plan').send({ planId: 'pilot' }).expect(200);
    await b.advanceClock(32 * DAY);
    await untilPlan(tenantId, 'pilot');
    const billing = await asOwner('get', '/v1/billing').expect(200);
    expect(billing.body).toMatchObject({ planSource: 'free', subscription: null });
    await asOwner('post', '/v1/billing/subscription/cancel').expect(409);
  });

  it('lets only owners change billing, and operators only read it', async () => {
    for (const role of ['developer', 'viewer'] as const) {
      const s = await createUserSession(b.t.ctx, b.t.app, { tenantId, role });
      const res = await request(b.t.app).post('/v1/billing/checkout').set('Cookie', s.cookie).set('X-CSRF-Token', s.csrf).send({ planId: 'field' });
      expect(res.status, role).toBe(403);
      expect((await request(b.t.app).get('/v1/billing').set('Cookie', s.cookie)).status, role).toBe(403);
    }
    const operator = await createUserSession(b.t.ctx, b.t.app, { tenantId, role: 'operator' });
    const asOperator = (method: 'get' | 'post' | 'put') => (url: string) => request(b.t.app)[method](url).set('Cookie', operator.cookie).set('X-CSRF-Token', operator.csrf).set('X-Tenant-Id', tenantId);
    await asOperator('get')('/v1/billing').expect(200);
    await asOperator('post')('/v1/billing/checkout').send({ planId: 'field' }).expect(403);
    const put = await asOperator('put')('/v1/tenant/plan').send({ planId: 'fleet' }).expect(409);
    expect(put.body.type).toBe('/problems/use-plan-grant');
  });

  it('stores nothing about cards: no card number, expiry or security code in any table', async () => {
    const tables: { table_name: string }[] = await b.t.ctx.db.query(`SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE'`);
    for (const { table_name } of tables) {
      const [{ hits }] = await b.t.ctx.db.query(`SELECT count(*)::int AS hits FROM "${table_name}" x WHERE to_jsonb(x)::text ~ '4242 ?4242 ?4242 ?4242|4000 ?0000 ?0000 ?0002|12/34'`);
      expect(hits, table_name).toBe(0);
    }
    const columns: { column_name: string }[] = await b.t.ctx.db.query(`SELECT column_name FROM information_schema.columns WHERE table_name LIKE 'billing%'`);
    expect(columns.map((c) => c.column_name).filter((c) => /card|last4|brand|exp|cvc|pan/.test(c))).toEqual([]);
  });
});
