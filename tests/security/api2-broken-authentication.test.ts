// OWASP API Security Top 10 (2023), API2 Broken Authentication: forged, expired, tampered and
// `alg: none` session tokens; revoked, expired, unknown and malformed API keys; sessions that end
// on sign-out and on a password change. Every refusal is a problem+json 401 with WWW-Authenticate.
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiKey } from '../../api/src/services/api-keys';
import { eventually } from '../support/eventually';
import { createTenantWithKey, createUserSession } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';

const SECRET = 'test-secret-not-for-production';

function expect401(res: request.Response, why: string) {
  expect(res.status, `${why}: ${res.text.slice(0, 200)}`).toBe(401);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.headers['www-authenticate']).toMatch(/^Bearer/);
  expect(res.body.type).toBe('/problems/unauthenticated');
}

const b64url = (v: object) => Buffer.from(JSON.stringify(v)).toString('base64url');

describe('API2 broken authentication', () => {
  let t: TestApp;
  let tenantId: string;
  let owner: Awaited<ReturnType<typeof createUserSession>>;
  let claims: { sid: string; sub: string };
  const sessionCookie = (token: string) => `gw_session=${token}`;
  const withSession = (token: string) => request(t.app).get('/v1/auth/session').set('Cookie', sessionCookie(token));

  beforeAll(async () => {
    t = await startTestApp({ JWT_SECRET: SECRET });
    ({ tenantId } = await createTenantWithKey(t.ctx));
    owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    const token = owner.cookie.split('; ').find((c) => c.startsWith('gw_session='))!.slice('gw_session='.length);
    claims = jwt.decode(token) as { sid: string; sub: string };
  });
  afterAll(async () => t.close());

  it('accepts the genuine session (the refusals below are not the default)', async () => {
    const res = await request(t.app).get('/v1/auth/session').set('Cookie', owner.cookie);
    expect(res.status).toBe(200);
  });

  it('refuses a token signed with another secret', async () => {
    const forged = jwt.sign({ sid: claims.sid, sub: claims.sub }, 'guessed-secret', { algorithm: 'HS256', issuer: 'gridwright', expiresIn: 600 });
    expect401(await withSession(forged), 'forged');
  });

  it('refuses an expired token with the right secret and a live session id', async () => {
    const expired = jwt.sign({ sid: claims.sid, sub: claims.sub, exp: Math.floor(Date.now() / 1000) - 60 }, SECRET, { algorithm: 'HS256', issuer: 'gridwright' });
    expect401(await withSession(expired), 'expired');
  });

  it('refuses an unsigned `alg: none` token', async () => {
    const none = `${b64url({ alg: 'none', typ: 'JWT' })}.${b64url({ sid: claims.sid, sub: claims.sub, iss: 'gridwright', exp: Math.floor(Date.now() / 1000) + 600 })}.`;
    expect401(await withSession(none), 'alg none');
  });

  it('refuses a token of another algorithm family, a wrong issuer and a tampered payload', async () => {
    const hs512 = jwt.sign({ sid: claims.sid, sub: claims.sub }, SECRET, { algorithm: 'HS512', issuer: 'gridwright', expiresIn: 600 });
    expect401(await withSession(hs512), 'HS512');
    const issuer = jwt.sign({ sid: claims.sid, sub: claims.sub }, SECRET, { algorithm: 'HS256', issuer: 'elsewhere', expiresIn: 600 });
    expect401(await withSession(issuer), 'wrong issuer');
    const genuine = owner.cookie.split('; ').find((c) => c.startsWith('gw_session='))!.slice('gw_session='.length);
    const [h, , s] = genuine.split('.');
    const tampered = `${h}.${b64url({ ...claims, sub: '00000000-0000-4000-8000-000000000000', iss: 'gridwright', exp: Math.floor(Date.now() / 1000) + 600 })}.${s}`;
    expect401(await withSession(tampered), 'tampered');
  });

  it('refuses a correctly signed token whose session id names no session', async () => {
    const ghost = jwt.sign({ sid: '11111111-1111-4111-8111-111111111111', sub: claims.sub }, SECRET, { algorithm: 'HS256', issuer: 'gridwright', expiresIn: 600 });
    expect401(await withSession(ghost), 'unknown session');
  });

  it('refuses malformed, unknown, revoked and expired API keys', async () => {
    const get = (auth: string) => request(t.app).get('/v1/runs').set('Authorization', auth);
    expect401(await get('Basic dXNlcjpwYXNz'), 'basic auth');
    expect401(await get('Bearer'), 'empty bearer');
    expect401(await get('Bearer gw_000000000000_' + 'A'.repeat(43)), 'unknown key');
    const { key, apiKey } = await createApiKey(t.ctx, { tenantId, name: 'to revoke', scopes: ['runs:read'] }, {});
    expect((await get(`Bearer ${key}`)).status).toBe(200);
    const revoke = await request(t.app).post(`/v1/api-keys/${apiKey.id}/revoke`).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);
    expect(revoke.status).toBe(200);
    expect401(await get(`Bearer ${key}`), 'revoked key');

    const soon = await createApiKey(t.ctx, { tenantId, name: 'to expire', scopes: ['runs:read'], expiresAt: new Date(Date.now() + 60_000) }, {});
    expect((await get(`Bearer ${soon.key}`)).status).toBe(200);
    // Move its expiry into the past rather than wait a minute.
    // Changed beside the app, as another process would: the change notice reaches the app's cache.
    await t.ctx.db.query(`UPDATE api_keys SET expires_at = now() - interval '1 second' WHERE id = $1`, [soon.apiKey.id]);
    expect401(await eventually('the expired key to be refused', async () => {
      const res = await get(`Bearer ${soon.key}`);
      return res.status === 200 ? undefined : res;
    }), 'expired key');
    // A key that differs from a live one in its secret part only.
    const live = await createApiKey(t.ctx, { tenantId, name: 'live', scopes: ['runs:read'] }, {});
    const flipped = live.key.slice(0, -1) + (live.key.endsWith('A') ? 'B' : 'A');
    expect401(await get(`Bearer ${flipped}`), 'wrong secret with a live prefix');
  });

  it('ends the session on sign-out: the same cookie is refused afterwards', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const out = await request(t.app).post('/v1/auth/sign-out').set('Cookie', s.cookie).set('X-CSRF-Token', s.csrf);
    expect(out.status).toBe(204);
    expect401(await request(t.app).get('/v1/auth/session').set('Cookie', s.cookie), 'after sign-out');
  });

  it('ends every other session of the person when the password changes', async () => {
    const first = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const secondSignIn = await request(t.app).post('/v1/auth/sign-in').send({ email: first.email, password: first.password });
    expect(secondSignIn.status).toBe(200);
    const second = (secondSignIn.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ');
    const change = await request(t.app)
      .post('/v1/auth/password')
      .set('Cookie', first.cookie)
      .set('X-CSRF-Token', first.csrf)
      .send({ currentPassword: first.password, newPassword: 'a-brand-new-long-password-42' });
    expect(change.status, change.text).toBe(200);
    expect401(await request(t.app).get('/v1/auth/session').set('Cookie', second), 'other session after password change');
    expect401(await request(t.app).get('/v1/auth/session').set('Cookie', first.cookie), 'old cookie after password change');
    const fresh = (change.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ');
    expect((await request(t.app).get('/v1/auth/session').set('Cookie', fresh)).status).toBe(200);
    const oldPassword = await request(t.app).post('/v1/auth/sign-in').send({ email: first.email, password: first.password });
    expect(oldPassword.status).toBe(401);
  });
});
