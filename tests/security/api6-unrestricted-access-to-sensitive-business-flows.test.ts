// OWASP API Security Top 10 (2023), API6 Unrestricted Access to Sensitive Business Flows: sign-in
// is locked after repeated failures (and the right password does not get through the lock),
// invitation and reset links work once and expire, and neither sign-in nor password reset tells
// whether an address has an account.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTenantWithKey, createUserSession } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';

describe('API6 unrestricted access to sensitive business flows', () => {
  let t: TestApp;
  let tenantId: string;
  beforeAll(async () => {
    t = await startTestApp({ SIGNIN_MAX_FAILURES: '3', SIGNIN_LOCK_MINUTES: '15' });
    ({ tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  /** The token in the newest e-mail to `to` (read from the outbox the loopback SMTP server fills). */
  async function tokenMailedTo(to: string, after = new Date(0)): Promise<string> {
    for (let i = 0; i < 100; i++) {
      const [m] = await t.ctx.db.query(`SELECT text_body FROM outbox_messages WHERE $1 = ANY(rcpt_to) AND received_at > $2 ORDER BY received_at DESC LIMIT 1`, [to, after]);
      const token = m?.text_body?.match(/token=([A-Za-z0-9_-]+)/)?.[1];
      if (token) return token;
      await new Promise((r) => setTimeout(r, 50));
    }
    throw new Error(`no e-mail with a token reached ${to}`);
  }

  it('locks an account after repeated failures; even the right password is refused while locked', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const attempt = (password: string) => request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password });
    for (let i = 0; i < 3; i++) expect((await attempt('wrong-password-123')).status).toBe(401);
    const locked = await attempt(s.password);
    expect(locked.status).toBe(429);
    expect(locked.body.type).toBe('/problems/sign-in-locked');
    expect(Number(locked.headers['retry-after'])).toBeGreaterThan(0);
  });

  it('answers a wrong password and an unknown address alike (no account enumeration)', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    const wrong = await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: 'not-the-password-1' });
    const unknown = await request(t.app).post('/v1/auth/sign-in').send({ email: `nobody-${Date.now()}@example.test`, password: 'not-the-password-1' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect({ ...unknown.body, instance: undefined }).toEqual({ ...wrong.body, instance: undefined });

    const resetKnown = await request(t.app).post('/v1/auth/password-reset').send({ email: s.email });
    const resetUnknown = await request(t.app).post('/v1/auth/password-reset').send({ email: `nobody-${Date.now()}@example.test` });
    expect(resetKnown.status).toBe(202);
    expect(resetUnknown.status).toBe(202);
    expect(resetUnknown.body).toEqual(resetKnown.body);
  });

  it('lets a reset link set a password once; the second use and a stale link are refused', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const since = new Date(Date.now() - 1000);
    expect((await request(t.app).post('/v1/auth/password-reset').send({ email: s.email })).status).toBe(202);
    const token = await tokenMailedTo(s.email, since);
    const first = await request(t.app).post('/v1/auth/password-reset/complete').send({ token, password: 'a-fresh-long-password-1' });
    expect(first.status, first.text).toBe(204);
    const again = await request(t.app).post('/v1/auth/password-reset/complete').send({ token, password: 'another-long-password-2' });
    expect(again.status).toBeGreaterThanOrEqual(400);
    expect(again.body.type).toBe('/problems/invalid-token');
    expect((await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: 'a-fresh-long-password-1' })).status).toBe(200);

    const since2 = new Date();
    await request(t.app).post('/v1/auth/password-reset').send({ email: s.email });
    const stale = await tokenMailedTo(s.email, since2);
    await t.ctx.db.query(`UPDATE password_resets SET expires_at = now() - interval '1 second' WHERE used_at IS NULL`);
    const expired = await request(t.app).post('/v1/auth/password-reset/complete').send({ token: stale, password: 'too-late-long-password-3' });
    expect(expired.body.type).toBe('/problems/invalid-token');
  });

  it('lets an invitation be accepted once; a second use and an expired invitation are refused', async () => {
    const owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    const invite = (email: string) => request(t.app).post('/v1/members/invitations').set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ email, role: 'viewer' });
    const email = `invitee-${Date.now()}@example.test`;
    expect((await invite(email)).status).toBe(201);
    const token = await tokenMailedTo(email);
    const accepted = await request(t.app).post('/v1/auth/invitations/accept').send({ token, password: 'invitee-long-password-1', name: 'Invitee' });
    expect(accepted.status, accepted.text).toBe(201);
    const twice = await request(t.app).post('/v1/auth/invitations/accept').send({ token, password: 'invitee-long-password-2', name: 'Again' });
    expect(twice.body.type).toBe('/problems/invalid-token');

    const late = `late-${Date.now()}@example.test`;
    expect((await invite(late)).status).toBe(201);
    const lateToken = await tokenMailedTo(late);
    await t.ctx.db.query(`UPDATE invitations SET expires_at = now() - interval '1 second' WHERE email = $1`, [late]);
    const expired = await request(t.app).post('/v1/auth/invitations/accept').send({ token: lateToken, password: 'late-long-password-1', name: 'Late' });
    expect(expired.body.type).toBe('/problems/invalid-token');
  });
});
