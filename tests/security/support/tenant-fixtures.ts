import request from 'supertest';
import { expect } from 'vitest';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';
import { startWebhookReceiver } from '../../support/webhook-receiver';
import { collectionOf, send, SMALL_SERIES_CSV, type Actor } from './operation-requests';
import type { Operation } from './openapi-operations';

export interface TenantWithResources {
  tenantId: string;
  apiKey: string;
  owner: Extract<Actor, { kind: 'session' }> & { userId: string; email: string };
  developerId: string;
  /** One resource id per collection path (`/v1/runs` → a run id). */
  fixtures: Map<string, string>;
  /** Secrets shown once at creation (the webhook signing secret, the API key). */
  secrets: { webhookSecret: string; apiKey: string };
}

/**
 * A tenant with one resource of every kind, made through the public routes, each named with
 * `marker` where it has a name. A webhook endpoint needs a loopback receiver URL.
 */
export async function createTenantWithResources(t: TestApp, doc: Record<string, any>, opts: { marker: string; receiverUrl: string }): Promise<TenantWithResources> {
  const { marker } = opts;
  const tenant = await createTenantWithKey(t.ctx);
  const s = await createUserSession(t.ctx, t.app, { tenantId: tenant.tenantId, role: 'owner' });
  const owner = { kind: 'session' as const, label: 'owner', cookie: s.cookie, csrf: s.csrf, userId: s.userId, email: s.email };
  const developer = await createUserSession(t.ctx, t.app, { tenantId: tenant.tenantId, role: 'developer' });
  const asOwner = (method: 'post', url: string) => request(t.app)[method](url).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);
  const fixtures = new Map<string, string>();

  const ex = doc.components.examples.SiteSpecExample.value;
  const run = await asOwner('post', '/v1/runs').send({ ...ex, name: `${marker} run`, solver: { ...(ex.solver ?? {}), timeLimitSeconds: 5 } });
  expect(run.status, JSON.stringify(run.body)).toBe(202);
  fixtures.set('/v1/runs', run.body.id);
  const studyExample = doc.components.examples.StudyRequestExample.value;
  const study = await asOwner('post', '/v1/studies').send({ ...studyExample, name: `${marker} study` });
  expect(study.status, JSON.stringify(study.body)).toBe(202);
  fixtures.set('/v1/studies', study.body.id);
  const series = await request(t.app)
    .post(`/v1/series?name=${marker}-series`)
    .set('Authorization', `Bearer ${tenant.apiKey}`)
    .attach('file', Buffer.from(SMALL_SERIES_CSV), { filename: 'pv.csv', contentType: 'text/csv' });
  expect(series.status, JSON.stringify(series.body)).toBe(201);
  fixtures.set('/v1/series', series.body.items[0].id);
  const endpoint = await asOwner('post', '/v1/webhook-endpoints').send({ url: opts.receiverUrl, description: `${marker} hook` });
  expect(endpoint.status, JSON.stringify(endpoint.body)).toBe(201);
  fixtures.set('/v1/webhook-endpoints', endpoint.body.id);
  const profileExample = doc.paths['/v1/export-profiles'].post.requestBody.content['application/json'].example ?? {};
  const profile = await asOwner('post', '/v1/export-profiles').send({ ...profileExample, name: `${marker} profile` });
  expect(profile.status, JSON.stringify(profile.body)).toBe(201);
  fixtures.set('/v1/export-profiles', profile.body.id);
  const invitation = await asOwner('post', '/v1/members/invitations').send({ email: `${marker}@example.test`, role: 'viewer' });
  expect(invitation.status, JSON.stringify(invitation.body)).toBe(201);
  fixtures.set('/v1/members/invitations', invitation.body.id);
  fixtures.set('/v1/members', developer.userId);
  const keyList = await request(t.app).get('/v1/api-keys').set('Cookie', owner.cookie);
  expect(keyList.status, JSON.stringify(keyList.body)).toBe(200);
  fixtures.set('/v1/api-keys', keyList.body.items[0].id);
  fixtures.set('/v1/admin/tenants', tenant.tenantId);
  // The invitation above was mailed (over SMTP, so it lands a moment later) to the invited address.
  let outbox: { id: string } | undefined;
  for (let i = 0; i < 100 && !outbox; i++) {
    [outbox] = await t.ctx.db.query(`SELECT id FROM outbox_messages WHERE $1 = ANY(rcpt_to) LIMIT 1`, [`${marker}@example.test`]);
    if (!outbox) await new Promise((r) => setTimeout(r, 50));
  }
  expect(outbox, 'the invitation e-mail reached the outbox').toBeDefined();
  fixtures.set('/v1/admin/outbox', outbox!.id);
  return { tenantId: tenant.tenantId, apiKey: tenant.apiKey, owner, developerId: developer.userId, fixtures, secrets: { webhookSecret: endpoint.body.secret, apiKey: tenant.apiKey } };
}

/** Path values from the fixtures, or null when some parameter has no fixture. */
export function fixtureValues(op: Operation, fixtures: Map<string, string>): Record<string, string> | null {
  const values: Record<string, string> = {};
  for (const p of op.pathParams) {
    const id = fixtures.get(collectionOf(op.path, p));
    if (!id) return null;
    values[p] = id;
  }
  return values;
}

export { send };

export interface AppWithResources {
  t: TestApp;
  tenant: TenantWithResources;
  /** An operator session acting on the tenant (X-Tenant-Id). */
  operator: Extract<Actor, { kind: 'session' }>;
  /** Who may call `op`: nobody for public operations, the operator for operator actions, else the tenant's owner. */
  actorFor(op: Operation): Actor;
  close(): Promise<void>;
}

/** An app (rate limits out of the way) with a tenant holding one resource of every kind, and its callers. */
export async function startAppWithResources(doc: Record<string, any>, marker: string): Promise<AppWithResources> {
  const t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '3600' });
  const receiver = await startWebhookReceiver();
  const tenant = await createTenantWithResources(t, doc, { marker, receiverUrl: receiver.url });
  const op = await createUserSession(t.ctx, t.app, { tenantId: tenant.tenantId, role: 'operator' });
  const operator = { kind: 'session' as const, label: 'operator', cookie: op.cookie, csrf: op.csrf, tenantHeader: tenant.tenantId };
  return {
    t,
    tenant,
    operator,
    actorFor: (o) =>
      !o.secured ? { kind: 'anonymous', label: 'nobody' } : o.permission && ['tenants.operate', 'outbox.read'].includes(o.permission) ? operator : tenant.owner,
    async close() {
      await receiver.close();
      await t.close();
    },
  };
}
