import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../api/src/db/entities/audit-event';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

describe('sign-in throttling', () => {
  let t: TestApp;
  let tenantId: string;
  beforeAll(async () => {
    t = await startTestApp({ SIGNIN_MAX_FAILURES: '3' });
    ({ tenantId } = await createTenantWithKey(t.ctx));
  });
  afterAll(async () => t.close());

  it('locks an account after repeated failures, even for the right password, and says when to retry', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    for (let i = 0; i < 3; i++) await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: 'wrong-password' }).expect(401);
    const locked = await request(t.app).post('/v1/auth/sign-in').send({ email: s.email.toUpperCase(), password: s.password }).expect(429);
    expect(locked.body.type).toBe('/problems/sign-in-locked');
    expect(Number(locked.headers['retry-after'])).toBeGreaterThan(0);
    const events = await t.ctx.db.getRepository(AuditEvent).findBy({ target: s.email.toLowerCase() });
    expect(events.map((e) => e.action)).toEqual(expect.arrayContaining(['sign-in-failed', 'sign-in-locked']));
  });

  it('locks an unknown address the same way, so locking reveals nothing', async () => {
    for (let i = 0; i < 3; i++) await request(t.app).post('/v1/auth/sign-in').send({ email: 'ghost@example.test', password: 'wrong-password' }).expect(401);
    const res = await request(t.app).post('/v1/auth/sign-in').send({ email: 'ghost@example.test', password: 'wrong-password' }).expect(429);
    expect(res.body.type).toBe('/problems/sign-in-locked');
  });

  it('clears the count after a successful sign-in', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    for (let round = 0; round < 2; round++) {
      for (let i = 0; i < 2; i++) await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: 'wrong-password' }).expect(401);
      await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: s.password }).expect(200);
    }
  });

  it('locks a client address that fails across many accounts', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    // Per address the limit is ten times the per-account one (3 here), counted across all accounts.
    const used = await t.ctx.db.query(`SELECT coalesce(max(points), 0)::int AS n FROM rate_limits WHERE key LIKE 'signin-address%'`);
    for (let i = used[0].n; i < 30; i++) {
      await request(t.app).post('/v1/auth/sign-in').send({ email: `spray-${i}@example.test`, password: 'wrong-password' });
    }
    const res = await request(t.app).post('/v1/auth/sign-in').send({ email: s.email, password: s.password }).expect(429);
    expect(res.body.detail).toMatch(/address/);
  });
});
