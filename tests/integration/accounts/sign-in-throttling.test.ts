// Sign-in throttling: the lock per account and client address (the pair), per address and per
// account over all addresses; attempts counted atomically, so a burst never gets an attempt past the
// limit evaluated; and a refusal that takes as long for an unknown address as for a real account.
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import bcrypt from 'bcryptjs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent } from '../../../api/src/db/entities/audit-event';
import { unknownAccountHash } from '../../../api/src/services/passwords';
import { failureDelayMs, SPREAD_FAILURE_FACTOR } from '../../../api/src/services/sign-in';
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

describe('sign-in throttling under concurrency and from several addresses', () => {
  const MAX = 3;
  let t: TestApp;
  let tenantId: string;
  let server: Server;
  let base: string;
  beforeAll(async () => {
    // Behind a trusted proxy, so each request can come from its own client address (X-Forwarded-For).
    t = await startTestApp({ SIGNIN_MAX_FAILURES: String(MAX), TRUST_PROXY: 'true', BCRYPT_ROUNDS: '5' });
    ({ tenantId } = await createTenantWithKey(t.ctx));
    server = await new Promise<Server>((resolve) => {
      const s = t.app.listen(0, '127.0.0.1', () => resolve(s));
    });
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  });
  afterAll(async () => {
    await new Promise((r) => server?.close(r));
    await t?.close();
  });

  const signIn = (email: string, password: string, from = '203.0.113.1') =>
    fetch(`${base}/v1/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json', 'x-forwarded-for': from }, body: JSON.stringify({ email, password }) }).then((r) => r.status);

  it('evaluates no attempt past the limit when wrong passwords and the right one arrive at once', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    for (let i = 0; i < MAX - 1; i++) expect(await signIn(s.email, 'wrong-password-1')).toBe(401);
    // One attempt is left: of these 21, sent together over separate connections, exactly one is evaluated.
    const burst = await Promise.all([...Array.from({ length: 20 }, () => signIn(s.email, 'wrong-password-2')), signIn(s.email, s.password)]);
    const evaluated = burst.filter((status) => status === 200 || status === 401);
    expect(evaluated).toHaveLength(1);
    expect(burst.filter((status) => status === 429)).toHaveLength(20);
  });

  it('lets at most the limit through a burst of 50 wrong passwords and the right one', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    const burst = await Promise.all([...Array.from({ length: 50 }, () => signIn(s.email, 'wrong-password-3')), signIn(s.email, s.password)]);
    const failures = burst.filter((status) => status === 401).length;
    const successes = burst.filter((status) => status === 200).length;
    expect(failures + successes).toBeLessThanOrEqual(MAX);
    // The right password got in only if it was among the first MAX attempts counted.
    if (successes) expect(failures).toBeLessThan(MAX);
    expect(burst.filter((status) => status === 429).length).toBeGreaterThanOrEqual(51 - MAX);
  });

  it('locks a guessing address out of an account without locking the account for its owner elsewhere', async () => {
    const victim = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
    for (let i = 0; i < MAX; i++) expect(await signIn(victim.email, 'guess', '203.0.113.66')).toBe(401);
    for (let i = 0; i < 20; i++) expect(await signIn(victim.email, 'guess', '203.0.113.66')).toBe(429);
    expect(await signIn(victim.email, victim.password, '203.0.113.66')).toBe(429);
    expect(await signIn(victim.email, victim.password, '198.51.100.7')).toBe(200);
  });

  it(`locks the account everywhere only after ${SPREAD_FAILURE_FACTOR} times the limit, which takes ${SPREAD_FAILURE_FACTOR} addresses`, async () => {
    const victim = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    // The limit's worth of failures from each address (sent together: the answers' slow-down overlaps).
    const guessFrom = (addresses: number[]) =>
      Promise.all(addresses.flatMap((a) => Array.from({ length: MAX }, () => signIn(victim.email, 'guess', `203.0.113.${100 + a}`))));
    const firstNine = Array.from({ length: SPREAD_FAILURE_FACTOR - 1 }, (_, i) => i + 1);
    expect(new Set(await guessFrom(firstNine))).toEqual(new Set([401]));
    expect(await signIn(victim.email, victim.password, '198.51.100.200')).toBe(200);
    expect(new Set(await guessFrom([SPREAD_FAILURE_FACTOR]))).toEqual(new Set([401]));
    const locked = await fetch(`${base}/v1/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', 'x-forwarded-for': '198.51.100.200' },
      body: JSON.stringify({ email: victim.email, password: victim.password }),
    });
    expect(locked.status).toBe(429);
    expect((await locked.json()).detail).toMatch(/for this account;/);
  });

  it('refuses an unknown address after a bcrypt comparison of the same cost as a stored password', async () => {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    const [row] = await t.ctx.db.query(`SELECT password_hash FROM users WHERE id = $1`, [s.userId]);
    expect(t.ctx.config.bcryptRounds).toBe(5);
    expect(bcrypt.getRounds(await unknownAccountHash(t.ctx.config))).toBe(bcrypt.getRounds(row.password_hash));
    expect(bcrypt.getRounds(row.password_hash)).toBe(5);
  });

  it('slows failed answers from the second failure on, 250 ms doubling to 2 s', () => {
    expect([1, 2, 3, 4, 5, 6, 9].map(failureDelayMs)).toEqual([0, 250, 500, 1000, 2000, 2000, 2000]);
  });
});
