import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

describe('tenants (operators) and isolation', () => {
  let t: TestApp;
  let operator: Awaited<ReturnType<typeof createUserSession>>;
  const asOperator = (r: request.Test) => r.set('Cookie', operator.cookie).set('X-CSRF-Token', operator.csrf);

  beforeAll(async () => {
    t = await startTestApp();
    const { tenantId } = await createTenantWithKey(t.ctx);
    operator = await createUserSession(t.ctx, t.app, { tenantId, role: 'operator' });
  });
  afterAll(async () => t.close());

  it('creates, renames, re-plans, overrides, suspends and resumes a tenant', async () => {
    const created = await asOperator(request(t.app).post('/v1/admin/tenants')).send({ slug: 'tidal-yard', name: 'Tidal Yard', planId: 'pilot' }).expect(201);
    const id = created.body.id;
    expect(created.body.limits.maxUnits).toBe(5);
    await asOperator(request(t.app).post('/v1/admin/tenants')).send({ slug: 'tidal-yard' }).expect(409);

    const changed = await asOperator(request(t.app).patch(`/v1/admin/tenants/${id}`))
      .send({ name: 'Tidal Yard Ltd', planId: 'field', limitOverrides: { maxUnits: 7 } })
      .expect(200);
    expect(changed.body).toMatchObject({ name: 'Tidal Yard Ltd', planId: 'field', limits: { maxUnits: 7, maxSteps: 8784 } });
    const cleared = await asOperator(request(t.app).patch(`/v1/admin/tenants/${id}`)).send({ limitOverrides: { maxUnits: null } }).expect(200);
    expect(cleared.body.limits.maxUnits).toBe(20);
    const badPlan = await asOperator(request(t.app).patch(`/v1/admin/tenants/${id}`)).send({ planId: 'no-such-plan' }).expect(400);
    expect(badPlan.body.errors[0].pointer).toBe('/planId');

    const { apiKey } = await createTenantWithKey(t.ctx, { slug: 'suspend-me' });
    const victim = (await asOperator(request(t.app).get('/v1/admin/tenants').query({ q: 'suspend-me' })).expect(200)).body.items[0];
    const member = await createUserSession(t.ctx, t.app, { tenantId: victim.id, role: 'owner' });
    await asOperator(request(t.app).post(`/v1/admin/tenants/${victim.id}/suspend`)).send({ reason: 'invoice overdue' }).expect(200);
    for (const r of [
      request(t.app).get('/v1/usage').set('Authorization', `Bearer ${apiKey}`),
      request(t.app).get('/v1/usage').set('Cookie', member.cookie),
      request(t.app).post('/v1/auth/sign-in').send({ email: member.email, password: member.password }),
    ]) {
      const res = await r.expect(403);
      expect(res.body.type).toBe('/problems/tenant-suspended');
      expect(res.body.detail).toMatch(/suspended.*invoice overdue/);
    }
    await asOperator(request(t.app).post(`/v1/admin/tenants/${victim.id}/resume`)).expect(200);
    await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${apiKey}`).expect(200);

    const audit = await asOperator(request(t.app).get('/v1/admin/audit-events').query({ tenantId: victim.id })).expect(200);
    expect(audit.body.items.map((e: { action: string }) => e.action)).toEqual(expect.arrayContaining(['tenant-suspended', 'tenant-resumed']));
    const plans = await asOperator(request(t.app).get('/v1/admin/audit-events').query({ action: 'plan-changed' })).expect(200);
    expect(plans.body.items[0]).toMatchObject({ tenantId: id, details: { from: 'pilot', to: 'field' } });
  });

  it("answers 404 for another tenant's members, keys and invitations", async () => {
    const a = await createTenantWithKey(t.ctx);
    const b = await createTenantWithKey(t.ctx);
    const ownerA = await createUserSession(t.ctx, t.app, { tenantId: a.tenantId, role: 'owner' });
    const ownerB = await createUserSession(t.ctx, t.app, { tenantId: b.tenantId, role: 'owner' });
    const asA = (r: request.Test) => r.set('Cookie', ownerA.cookie).set('X-CSRF-Token', ownerA.csrf);
    const asB = (r: request.Test) => r.set('Cookie', ownerB.cookie).set('X-CSRF-Token', ownerB.csrf);
    const keyA = (await asA(request(t.app).post('/v1/api-keys')).send({ name: 'a', scopes: ['runs:read'] }).expect(201)).body.apiKey.id;
    const inviteA = (await asA(request(t.app).post('/v1/members/invitations')).send({ email: 'new@a.example', role: 'viewer' }).expect(201)).body.id;

    for (const r of [
      asB(request(t.app).get(`/v1/api-keys/${keyA}`)),
      asB(request(t.app).post(`/v1/api-keys/${keyA}/revoke`)),
      asB(request(t.app).patch(`/v1/members/${ownerA.userId}`)).send({ role: 'viewer' }),
      asB(request(t.app).delete(`/v1/members/${ownerA.userId}`)),
      asB(request(t.app).delete(`/v1/members/invitations/${inviteA}`)),
    ]) {
      const res = await r;
      expect(res.status).toBe(404);
      expect(JSON.stringify(res.body)).not.toContain(ownerA.email);
    }
    const members = await asB(request(t.app).get('/v1/members')).expect(200);
    expect(members.body.items.map((m: { id: string }) => m.id)).not.toContain(ownerA.userId);
    const keys = await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${b.apiKey}`).expect(200);
    expect(keys.body.tenantId).toBe(b.tenantId);
    const audit = await asB(request(t.app).get('/v1/audit-events')).expect(200);
    expect(audit.body.items.every((e: { tenantId: string }) => e.tenantId === b.tenantId)).toBe(true);
    await asA(request(t.app).get(`/v1/api-keys/${keyA}`)).expect(200);
  });

  it('lets operators act on a chosen tenant and refuses a tenant action without one', async () => {
    const { tenantId } = await createTenantWithKey(t.ctx);
    const me = await request(t.app).get('/v1/auth/session').set('Cookie', operator.cookie).expect(200);
    expect(me.body).toMatchObject({ role: 'operator', tenant: null });
    expect(me.body.permissions).toContain('tenants.operate');
    const none = await request(t.app).get('/v1/usage').set('Cookie', operator.cookie).expect(400);
    expect(none.body.type).toBe('/problems/tenant-not-selected');
    const usage = await request(t.app).get('/v1/usage').set('Cookie', operator.cookie).set('X-Tenant-Id', tenantId).expect(200);
    expect(usage.body.tenantId).toBe(tenantId);
    await asOperator(request(t.app).get(`/v1/admin/tenants/${tenantId}/usage`)).expect(200);
  });

  it('lists the plans to an operator who has chosen no tenant (the plan pickers of the operator pages)', async () => {
    const plans = await request(t.app).get('/v1/plans').set('Cookie', operator.cookie).expect(200);
    expect(plans.body.items.map((p: { id: string }) => p.id)).toEqual(expect.arrayContaining(['pilot', 'field', 'fleet']));
    // The tenant itself still needs one.
    const tenant = await request(t.app).get('/v1/tenant').set('Cookie', operator.cookie).expect(400);
    expect(tenant.body.type).toBe('/problems/tenant-not-selected');
  });

  it('keeps the last owner', async () => {
    const { tenantId } = await createTenantWithKey(t.ctx);
    const owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    const as = (r: request.Test) => r.set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);
    const demote = await as(request(t.app).patch(`/v1/members/${owner.userId}`)).send({ role: 'developer' }).expect(409);
    expect(demote.body.type).toBe('/problems/last-owner');
    await as(request(t.app).delete(`/v1/members/${owner.userId}`)).expect(409);
    const dev = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    await as(request(t.app).patch(`/v1/members/${dev.userId}`)).send({ role: 'owner' }).expect(200);
    await as(request(t.app).delete(`/v1/members/${dev.userId}`)).expect(204);
    const roleChange = await as(request(t.app).get('/v1/audit-events').query({ action: 'role-changed' })).expect(200);
    expect(roleChange.body.items[0].details).toEqual({ from: 'developer', to: 'owner' });
  });
});
