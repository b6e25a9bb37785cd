import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ApiKey } from '../../../api/src/db/entities/api-key';
import { eventually } from '../../support/eventually';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

describe('API keys', () => {
  let t: TestApp;
  let tenantId: string;
  let owner: Awaited<ReturnType<typeof createUserSession>>;
  const asOwner = (r: request.Test) => r.set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);

  beforeAll(async () => {
    t = await startTestApp();
    ({ tenantId } = await createTenantWithKey(t.ctx));
    owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
  });
  afterAll(async () => t.close());

  it('shows a new key once, stores only its hash, and lists it by prefix', async () => {
    const created = await asOwner(request(t.app).post('/v1/api-keys')).send({ name: 'scada bridge', scopes: ['runs:read'] }).expect(201);
    const key: string = created.body.key;
    expect(key).toMatch(/^gw_[0-9a-f]{12}_[A-Za-z0-9_-]{43}$/);
    expect(created.body.apiKey.prefix).toBe(key.slice(0, 15));
    const row = await t.ctx.db.getRepository(ApiKey).createQueryBuilder('k').addSelect('k.secretHash').where('k.id = :id', { id: created.body.apiKey.id }).getOneOrFail();
    expect(row.secretHash).not.toContain(key.slice(16));
    expect(row.secretHash).toMatch(/^[0-9a-f]{64}$/);

    const list = await asOwner(request(t.app).get('/v1/api-keys')).expect(200);
    expect(JSON.stringify(list.body)).not.toContain(key.slice(16));
    expect(list.body.items.map((k: { name: string }) => k.name)).toContain('scada bridge');

    await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${key}`).expect(200);
    const one = await asOwner(request(t.app).get(`/v1/api-keys/${created.body.apiKey.id}`)).expect(200);
    expect(one.body.lastUsedAt).not.toBeNull();
  });

  it('refuses missing, malformed, unknown, revoked and expired keys with 401, a missing scope with 403', async () => {
    const created = await asOwner(request(t.app).post('/v1/api-keys')).send({ name: 'short-lived', scopes: ['runs:read'] }).expect(201);
    const key: string = created.body.key;
    await request(t.app).get('/v1/usage').expect(401);
    await request(t.app).get('/v1/usage').set('Authorization', 'Bearer not-a-key').expect(401);
    await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${key.slice(0, -2)}xx`).expect(401);
    await request(t.app).get('/v1/usage').set('Authorization', `Basic ${Buffer.from('a:b').toString('base64')}`).expect(401);

    const scope = await request(t.app).get('/v1/webhook-endpoints').set('Authorization', `Bearer ${key}`).expect(403);
    expect(scope.body.detail).toMatch(/webhooks:manage/);

    // Changed beside the app, as another process would: the change notice reaches the app's cache.
    await t.ctx.db.getRepository(ApiKey).update({ id: created.body.apiKey.id }, { expiresAt: new Date(Date.now() - 1000) });
    const expired = await eventually('the expired key to be refused', async () => {
      const res = await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${key}`);
      return res.status === 200 ? undefined : res;
    });
    expect(expired.status).toBe(401);
    expect(expired.body.detail).toMatch(/expired/);

    const other = await asOwner(request(t.app).post('/v1/api-keys')).send({ name: 'to revoke', scopes: ['runs:read'] }).expect(201);
    await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${other.body.key}`).expect(200);
    const revoked = await asOwner(request(t.app).post(`/v1/api-keys/${other.body.apiKey.id}/revoke`)).expect(200);
    expect(revoked.body.revokedAt).not.toBeNull();
    const refused = await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${other.body.key}`).expect(401);
    expect(refused.body.detail).toMatch(/revoked/);
    await asOwner(request(t.app).post(`/v1/api-keys/${other.body.apiKey.id}/revoke`)).expect(409);

    const audit = await asOwner(request(t.app).get('/v1/audit-events')).expect(200);
    expect(audit.body.items.map((e: { action: string }) => e.action)).toEqual(expect.arrayContaining(['key-created', 'key-revoked', 'sign-in']));
  });

  it('refuses an expiry in the past and unknown scopes, naming the field', async () => {
    const past = await asOwner(request(t.app).post('/v1/api-keys')).send({ name: 'x', scopes: ['runs:read'], expiresAt: '2020-01-01T00:00:00Z' }).expect(400);
    expect(past.body.errors[0].pointer).toBe('/expiresAt');
    const bad = await asOwner(request(t.app).post('/v1/api-keys')).send({ name: 'x', scopes: ['everything'] }).expect(400);
    expect(bad.body.errors[0].pointer).toMatch(/^\/scopes/);
  });

  it('pages through keys with a cursor', async () => {
    for (let i = 0; i < 3; i++) await asOwner(request(t.app).post('/v1/api-keys')).send({ name: `page ${i}`, scopes: ['runs:read'] }).expect(201);
    const seen = new Set<string>();
    let cursor: string | null = null;
    do {
      const res: request.Response = await asOwner(request(t.app).get('/v1/api-keys').query({ limit: 2, includeRevoked: true, ...(cursor ? { cursor } : {}) })).expect(200);
      for (const k of res.body.items) {
        expect(seen.has(k.id)).toBe(false);
        seen.add(k.id);
      }
      cursor = res.body.nextCursor;
    } while (cursor);
    expect(seen.size).toBe(await t.ctx.db.getRepository(ApiKey).countBy({ tenantId }));
  });
});
