import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Invitation } from '../../../api/src/db/entities/invitation';
import { PasswordReset } from '../../../api/src/db/entities/password-reset';
import { tokenFrom, waitForMail } from '../../support/outbox';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

describe('invitations and password resets by e-mail', () => {
  let t: TestApp;
  let tenantId: string;
  let owner: Awaited<ReturnType<typeof createUserSession>>;
  const asOwner = (r: request.Test) => r.set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);

  beforeAll(async () => {
    t = await startTestApp({ PUBLIC_URL: 'http://gridwright.test' });
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

  it('lets operators read the outbox', async () => {
    const operator = await createUserSession(t.ctx, t.app, { tenantId, role: 'operator' });
    const list = await request(t.app).get('/v1/admin/outbox').query({ kind: 'invitation', tenantId }).set('Cookie', operator.cookie).expect(200);
    expect(list.body.items.length).toBeGreaterThanOrEqual(3);
    expect(list.body.items[0]).toMatchObject({ kind: 'invitation', tenantId, from: 'no-reply@gridwright.local' });
    const one = await request(t.app).get(`/v1/admin/outbox/${list.body.items[0].id}`).set('Cookie', operator.cookie).expect(200);
    expect(one.body.raw).toMatch(/^[\s\S]*Subject: /m);
    await request(t.app).get('/v1/admin/outbox').set('Cookie', owner.cookie).expect(403);
  });
});
