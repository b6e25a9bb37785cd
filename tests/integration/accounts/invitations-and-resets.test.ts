import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Invitation } from '../../../api/src/db/entities/invitation';
import { PasswordReset } from '../../../api/src/db/entities/password-reset';
import { RESET_CLIENT_FACTOR, requestPasswordReset } from '../../../api/src/services/password-reset';
import { tokenFrom, waitForMail } from '../../support/outbox';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

describe('invitations and password resets by e-mail', () => {
  let t: TestApp;
  let tenantId: string;
  let owner: Awaited<ReturnType<typeof createUserSession>>;
  const asOwner = (r: request.Test) => r.set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);

  beforeAll(async () => {
    t = await startTestApp({ PUBLIC_URL: 'http://gridwright.test', PASSWORD_RESET_EMAILS_PER_HOUR: '2' });
    ({ tenantId } = await createTenantWithKey(t.ctx, { slug: 'kelp-farm' }));
    owner = await createUserSession(t.ctx, t.app, { tenantId, role: 'owner' });
  });
  afterAll(async () => t.close());

  it('invites by e-mail; the link works once and sets the password', async () => {
    await asOwner(request(t.app).post('/v1/members/invitations')).send({ email: 'ines@kelp.example', role: 'developer' }).expect(201);
    const [mail] = await waitForMail(t.ctx, { to: 'ines@kelp.example', kind: 'invitation' });
    expect(mail!.tenantId).toBe(tenantId);
    expect(mail!.subject).toContain('kelp-farm');
    expect(mail!.textBody).toContain('http://gridwright.test/accept-invitation?token=');
    expect(mail!.htmlBody).toContain('href="http://gridwright.test/accept-invitation?token=');
    const token = tokenFrom(mail!.textBody);
    const pending = await asOwner(request(t.app).get('/v1/members/invitations')).expect(200);
    expect(pending.body.items.map((i: { email: string }) => i.email)).toContain('ines@kelp.example');

    const joined = await request(t.app).post('/v1/auth/invitations/accept').send({ token, password: 'seaweed-and-sunlight', name: 'Ines' }).expect(201);
    expect(joined.body).toMatchObject({ role: 'developer', tenant: { id: tenantId }, user: { email: 'ines@kelp.example' } });
    const again = await request(t.app).post('/v1/auth/invitations/accept').send({ token, password: 'seaweed-and-sunlight' }).expect(400);
    expect(again.body.errors[0].pointer).toBe('/token');
    await request(t.app).post('/v1/auth/sign-in').send({ email: 'ines@kelp.example', password: 'seaweed-and-sunlight' }).expect(200);
  });

  it('refuses an expired or withdrawn invitation', async () => {
    await asOwner(request(t.app).post('/v1/members')).send({ email: 'late@kelp.example', role: 'viewer' }).expect(201);
    const token = tokenFrom((await waitForMail(t.ctx, { to: 'late@kelp.example' }))[0]!.textBody);
    await t.ctx.db.getRepository(Invitation).update({ email: 'late@kelp.example' }, { expiresAt: new Date(Date.now() - 1000) });
    await request(t.app).post('/v1/auth/invitations/accept').send({ token, password: 'seaweed-and-sunlight' }).expect(400);

    const invited = await asOwner(request(t.app).post('/v1/members/invitations')).send({ email: 'never@kelp.example', role: 'viewer' }).expect(201);
    const withdrawn = tokenFrom((await waitForMail(t.ctx, { to: 'never@kelp.example' }))[0]!.textBody);
    await asOwner(request(t.app).delete(`/v1/members/invitations/${invited.body.id}`)).expect(204);
    await request(t.app).post('/v1/auth/invitations/accept').send({ token: withdrawn, password: 'seaweed-and-sunlight' }).expect(400);
  });

  it('resets a password once, ending old sessions, and answers unknown addresses identically', async () => {
    const dev = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const known = await request(t.app).post('/v1/auth/password-reset').send({ email: dev.email }).expect(202);
    const unknown = await request(t.app).post('/v1/auth/password-reset').send({ email: 'nobody@kelp.example' }).expect(202);
    expect(unknown.body).toEqual(known.body);
    const [mail] = await waitForMail(t.ctx, { to: dev.email, kind: 'password-reset' });
    expect(mail!.textBody).toContain('http://gridwright.test/reset-password?token=');
    const token = tokenFrom(mail!.textBody);

    await request(t.app).post('/v1/auth/password-reset/complete').send({ token, password: 'short' }).expect(400);
    await request(t.app).post('/v1/auth/password-reset/complete').send({ token, password: 'brand-new-password' }).expect(204);
    await request(t.app).post('/v1/auth/password-reset/complete').send({ token, password: 'another-password' }).expect(400);
    await request(t.app).get('/v1/auth/session').set('Cookie', dev.cookie).expect(401);
    await request(t.app).post('/v1/auth/sign-in').send({ email: dev.email, password: dev.password }).expect(401);
    await request(t.app).post('/v1/auth/sign-in').send({ email: dev.email, password: 'brand-new-password' }).expect(200);
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM outbox_messages WHERE 'nobody@kelp.example' = ANY(rcpt_to)`);
    expect(n).toBe(0);
  });

  it('refuses an expired reset link', async () => {
    const dev = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    await request(t.app).post('/v1/auth/password-reset').send({ email: dev.email }).expect(202);
    const token = tokenFrom((await waitForMail(t.ctx, { to: dev.email, kind: 'password-reset' }))[0]!.textBody);
    await t.ctx.db.getRepository(PasswordReset).update({ userId: dev.userId }, { expiresAt: new Date(Date.now() - 1000) });
    const res = await request(t.app).post('/v1/auth/password-reset/complete').send({ token, password: 'brand-new-password' }).expect(400);
    expect(res.body.type).toBe('/problems/invalid-token');
  });

  it('lets operators read the outbox, with every single-use link hidden from them', async () => {
    const operator = await createUserSession(t.ctx, t.app, { tenantId, role: 'operator' });
    const list = await request(t.app).get('/v1/admin/outbox').query({ kind: 'invitation', tenantId }).set('Cookie', operator.cookie).expect(200);
    expect(list.body.items.length).toBeGreaterThanOrEqual(3);
    expect(list.body.items[0]).toMatchObject({ kind: 'invitation', tenantId, from: 'no-reply@gridwright.local' });
    const one = await request(t.app).get(`/v1/admin/outbox/${list.body.items[0].id}`).set('Cookie', operator.cookie).expect(200);
    expect(one.body.raw).toMatch(/^[\s\S]*Subject: /m);
    await request(t.app).get('/v1/admin/outbox').set('Cookie', owner.cookie).expect(403);

    // The messages as the SMTP server received them carry the links; the operator's view never does.
    const stored: { id: string; text_body: string }[] = await t.ctx.db.query(`SELECT id, text_body FROM outbox_messages WHERE kind IN ('invitation', 'password-reset')`);
    expect(stored.length).toBeGreaterThanOrEqual(5);
    const all = await request(t.app).get('/v1/admin/outbox').query({ limit: 200 }).set('Cookie', operator.cookie).expect(200);
    for (const m of stored) {
      const token = tokenFrom(m.text_body);
      const detail = await request(t.app).get(`/v1/admin/outbox/${m.id}`).set('Cookie', operator.cookie).expect(200);
      expect(detail.body.text).toContain('token=[hidden]');
      expect(detail.body.html).toContain('token=[hidden]');
      // Quoted-printable may break a token across lines; it is hidden however it is wrapped.
      const unwrapped = detail.body.raw.replace(/=\r?\n/g, '');
      for (const text of [detail.text, unwrapped, all.text]) expect(text.includes(token), m.id).toBe(false);
    }
  });

  it('answers an invitation to an address of another tenant like any other, and mails it no link', async () => {
    const other = await createTenantWithKey(t.ctx, { slug: 'tide-mill' });
    const elsewhere = await createUserSession(t.ctx, t.app, { tenantId: other.tenantId, role: 'developer' });
    const taken = await asOwner(request(t.app).post('/v1/members/invitations')).send({ email: elsewhere.email, role: 'viewer' });
    const fresh = await asOwner(request(t.app).post('/v1/members/invitations')).send({ email: 'free@kelp.example', role: 'viewer' });
    expect([taken.status, fresh.status]).toEqual([201, 201]);
    expect(Object.keys(taken.body).sort()).toEqual(Object.keys(fresh.body).sort());
    const pending = await asOwner(request(t.app).get('/v1/members/invitations')).expect(200);
    expect(pending.body.items.map((i: { email: string }) => i.email)).toEqual(expect.arrayContaining([elsewhere.email, 'free@kelp.example']));

    const [note] = await waitForMail(t.ctx, { to: elsewhere.email, kind: 'invitation-address-taken' });
    expect(note!.textBody).toContain('already has a Gridwright account');
    expect(note!.textBody).not.toContain('token=');
    const [row] = await t.ctx.db.query(`SELECT tenant_id, role FROM users WHERE id = $1`, [elsewhere.userId]);
    expect(row).toEqual({ tenant_id: other.tenantId, role: 'developer' });

    // A member of one's own tenant is no secret: the owner lists them anyway.
    const own = await asOwner(request(t.app).post('/v1/members/invitations')).send({ email: owner.email, role: 'viewer' });
    expect(own.status).toBe(409);
  });

  it('sends at most PASSWORD_RESET_EMAILS_PER_HOUR reset e-mails to one address, however often it is asked', async () => {
    const dev = await createUserSession(t.ctx, t.app, { tenantId, role: 'developer' });
    const answers = await Promise.all(Array.from({ length: 5 }, () => request(t.app).post('/v1/auth/password-reset').send({ email: dev.email })));
    expect(answers.map((a) => a.status)).toEqual([202, 202, 202, 202, 202]);
    expect(new Set(answers.map((a) => JSON.stringify(a.body))).size).toBe(1);
    // Each request is counted before anything is looked up; wait for all five, then count what they sent.
    await expect.poll(async () => (await t.ctx.db.query(`SELECT coalesce(max(points), 0)::int AS n FROM rate_limits WHERE key LIKE 'reset-address%' AND key LIKE $1`, [`%${dev.email}`]))[0].n, { timeout: 15_000 }).toBe(5);
    await waitForMail(t.ctx, { to: dev.email, kind: 'password-reset', count: 2 });
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM password_resets WHERE user_id = $1`, [dev.userId]);
    expect(n).toBe(2);
  });

  it('stops one client address after ten times as many reset requests, for known and unknown addresses alike', async () => {
    const dev = await createUserSession(t.ctx, t.app, { tenantId, role: 'viewer' });
    const ip = '198.51.100.23';
    for (let i = 0; i < 2 * RESET_CLIENT_FACTOR; i++) await requestPasswordReset(t.ctx, { email: `nobody-${i}@kelp.example`, ip });
    await requestPasswordReset(t.ctx, { email: dev.email, ip });
    const [{ n }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM password_resets WHERE user_id = $1`, [dev.userId]);
    expect(n).toBe(0);
    await requestPasswordReset(t.ctx, { email: dev.email, ip: '198.51.100.24' });
    const [{ n: after }] = await t.ctx.db.query(`SELECT count(*)::int AS n FROM password_resets WHERE user_id = $1`, [dev.userId]);
    expect(after).toBe(1);
  });
});
