import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

describe('sessions', () => {
  let t: TestApp;
  let tenantId: string;
  beforeAll(async () => {
    t = await startTestApp();
    ({ tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  it('signs in, sets httpOnly SameSite cookies, and describes the session', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const res = await request(t.app).get('/v1/auth/session').set('Cookie', s.cookie).expect(200);
    expect(res.body).toMatchObject({ role: 'developer', user: { email: s.email }, tenant: { id: tenantId }, csrfToken: s.csrf });
    expect(res.body.permissions).toContain('runs.create');
    expect(res.body.permissions).not.toContain('members.manage');
    expect(JSON.stringify(res.body)).not.toMatch(/password|hash/i);

    const signIn = await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: s.password }).expect(200);
    const cookies = signIn.headers['set-cookie'] as unknown as string[];
    const session = cookies.find((c) => c.startsWith('gw_session='))!;
    expect(session).toMatch(/HttpOnly/i);
    expect(session).toMatch(/SameSite=Lax/i);
    expect(cookies.find((c) => c.startsWith('gw_csrf='))).toMatch(/SameSite=Strict/i);
  });

  it('refuses unsafe requests without the CSRF header, or with one that does not match', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    const body = { name: 'ci', scopes: ['runs:read'] };
    const missing = await request(t.app).post('/v1/api-keys').set('Cookie', s.cookie).send(body).expect(403);
    expect(missing.body.type).toBe('/problems/csrf-failed');
    const wrong = await request(t.app).post('/v1/api-keys').set('Cookie', s.cookie).set('X-CSRF-Token', 'x'.repeat(43)).send(body).expect(403);
    expect(wrong.body.type).toBe('/problems/csrf-failed');
    await request(t.app).post('/v1/api-keys').set('Cookie', s.cookie).set('X-CSRF-Token', s.csrf).send(body).expect(201);
  });

  it('ends the session at sign-out', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    await request(t.app).post('/v1/auth/sign-out').set('Cookie', s.cookie).set('X-CSRF-Token', s.csrf).expect(204);
    const res = await request(t.app).get('/v1/auth/session').set('Cookie', s.cookie).expect(401);
    expect(res.body.detail).toMatch(/signed out/);
  });

  it('ends every session of a person whose password or role changes', async () => {
    const a = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const other = await request(t.app).post('/v1/auth/sign-in').send({ email: a.email, password: a.password }).expect(200);
    const otherCookie = (other.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ');
    const changed = await request(t.app)
      .post('/v1/auth/password')
      .set('Cookie', a.cookie)
      .set('X-CSRF-Token', a.csrf)
      .send({ currentPassword: a.password, newPassword: 'a-new-long-password' })
      .expect(200);
    await request(t.app).get('/v1/auth/session').set('Cookie', a.cookie).expect(401);
    await request(t.app).get('/v1/auth/session').set('Cookie', otherCookie).expect(401);
    const fresh = (changed.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ');
    await request(t.app).get('/v1/auth/session').set('Cookie', fresh).expect(200);

    const owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    const b = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    await request(t.app).patch(`/v1/members/${b.userId}`).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ role: 'viewer' }).expect(200);
    await request(t.app).get('/v1/auth/session').set('Cookie', b.cookie).expect(401);
  });

  it('refuses forged, expired and alg:none session tokens', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    const raw = s.cookie.split('; ').find((c) => c.startsWith('gw_session='))!.slice('gw_session='.length);
    const claims = jwt.decode(raw) as { sid: string; sub: string };
    const forged = jwt.sign({ sid: claims.sid, sub: claims.sub }, 'not-the-secret', { issuer: 'gridwright' });
    const expired = jwt.sign({ sid: claims.sid, sub: claims.sub, exp: Math.floor(Date.now() / 1000) - 10 }, 'test-secret-not-for-production', { issuer: 'gridwright' });
    const none = `${Buffer.from('{"alg":"none","typ":"JWT"}').toString('base64url')}.${Buffer.from(JSON.stringify({ ...claims, iss: 'gridwright' })).toString('base64url')}.`;
    for (const token of [forged, expired, none]) {
      const res = await request(t.app).get('/v1/auth/session').set('Cookie', `gw_session=${token}`).expect(401);
      expect(res.headers['content-type']).toMatch(/problem\+json/);
    }
  });

  it('answers a wrong password and an unknown address alike', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    const wrong = await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: 'not-the-password' }).expect(401);
    const unknown = await request(t.app).post('/v1/auth/sign-in').send({ email: 'nobody@example.test', password: 'not-the-password' }).expect(401);
    expect(unknown.body.detail).toBe(wrong.body.detail);
  });
});
