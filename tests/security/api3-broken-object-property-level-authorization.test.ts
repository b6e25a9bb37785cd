// OWASP API Security Top 10 (2023), API3 Broken Object Property Level Authorization: properties a
// client must not set (tenantId, role, plan, ids, hashes) are refused wherever a body is accepted
// — generated over every JSON request body in openapi.yaml — and no response ever carries a
// password hash, an API key or its hash, or a webhook signing secret after the one that created it.
import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createUserSession } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';
import { startWebhookReceiver, type WebhookReceiver } from '../support/webhook-receiver';
import { apiOperations, loadOpenApi, resolveRef, type Operation } from './support/openapi-operations';
import { exampleBody, send, unknownIds, type Actor } from './support/operation-requests';
import { createTenantWithResources, fixtureValues, type TenantWithResources } from './support/tenant-fixtures';

const doc = loadOpenApi();
const jsonBodyOps = apiOperations(doc).filter((o) => o.requestContentTypes.includes('application/json'));
const SMUGGLED: Record<string, unknown> = {
  tenantId: '00000000-0000-4000-8000-000000000001',
  role: 'operator',
  plan: 'fleet',
  planId: 'fleet',
  limitOverrides: { requestsPerSecond: 1e6 },
  passwordHash: '$2a$04$abcdefghijklmnopqrstuuABCDEFGHIJKLMNOPQRSTUVWXYZ01234',
  secretHash: 'f'.repeat(64),
  isOperator: true,
  suspendedAt: null,
  createdBy: '00000000-0000-4000-8000-000000000002',
};

/** The names a body schema documents at its top level (allOf/oneOf branches included). */
function documentedProperties(schema: any): Set<string> {
  const names = new Set<string>();
  const walk = (s: any) => {
    s = resolveRef(doc, s);
    if (!s || typeof s !== 'object') return;
    for (const k of Object.keys(s.properties ?? {})) names.add(k);
    for (const branch of [...(s.allOf ?? []), ...(s.oneOf ?? []), ...(s.anyOf ?? [])]) walk(branch);
  };
  walk(schema);
  return names;
}

describe('API3 broken object property level authorization', () => {
  let t: TestApp;
  let receiver: WebhookReceiver;
  let tenant: TenantWithResources;
  let operator: Actor;

  beforeAll(async () => {
    t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '3600' });
    receiver = await startWebhookReceiver();
    tenant = await createTenantWithResources(t, doc, { marker: 'api3-marker', receiverUrl: receiver.url });
    const op = await createUserSession(t.ctx, t.app, { tenantId: tenant.tenantId, role: 'operator' });
    operator = { kind: 'session', label: 'operator', cookie: op.cookie, csrf: op.csrf, tenantHeader: tenant.tenantId };
  });
  afterAll(async () => {
    await receiver?.close();
    await t?.close();
  });

  const actorFor = (op: Operation): Actor =>
    !op.secured ? { kind: 'anonymous', label: 'nobody' } : op.permission && ['tenants.operate', 'outbox.read'].includes(op.permission) ? operator : tenant.owner;

  for (const op of jsonBodyOps) {
    const schema = resolveRef(doc, op.raw.requestBody).content['application/json'].schema;
    const allowed = documentedProperties(schema);
    const smuggled = Object.keys(SMUGGLED).filter((k) => !allowed.has(k));
    it(`${op.method.toUpperCase()} ${op.path}: refuses ${smuggled.length} undocumented privileged properties by name`, async () => {
      const base = exampleBody(doc, op)!.body as Record<string, unknown>;
      for (const name of smuggled) {
        const res = await send(t.app, doc, op, actorFor(op), unknownIds(op), { ...base, [name]: SMUGGLED[name] });
        expect(res.status, `${name}: ${res.text.slice(0, 200)}`).toBe(400);
        expect(res.body.errors.map((e: { pointer: string }) => e.pointer), name).toContain(`/${name}`);
      }
    });
  }

  it('refuses a role outside the tenant roles when inviting or changing a member', async () => {
    const owner = tenant.owner;
    for (const [method, url] of [
      ['post', '/v1/members/invitations'],
      ['patch', `/v1/members/${tenant.developerId}`],
    ] as const) {
      const res = await request(t.app)[method](url).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ email: 'x@example.test', role: 'operator' });
      expect(res.status, url).toBe(400);
    }
    const members = await request(t.app).get('/v1/members').set('Cookie', owner.cookie);
    expect(members.body.items.find((m: { id: string }) => m.id === tenant.developerId).role).toBe('developer');
  });

  it('never answers with a password hash, an API key or key hash, or a signing secret after creation', async () => {
    const [user] = await t.ctx.db.query(`SELECT password_hash FROM users WHERE id = $1`, [tenant.owner.userId]);
    const keyHashes: { secret_hash: string }[] = await t.ctx.db.query(`SELECT secret_hash FROM api_keys WHERE tenant_id = $1`, [tenant.tenantId]);
    const forbidden = [user.password_hash, tenant.secrets.webhookSecret, tenant.secrets.apiKey, createHash('sha256').update(tenant.secrets.apiKey).digest('hex'), ...keyHashes.map((k) => k.secret_hash)];
    // The CSRF token is returned to its own session on purpose (the double-submit check needs it).
    const forbiddenNames = /"(passwordHash|password_hash|secretHash|secret_hash)"/;
    const getOps = apiOperations(doc).filter((o) => o.method === 'get' && o.secured);
    let checked = 0;
    for (const op of getOps) {
      const values = fixtureValues(op, tenant.fixtures);
      if (!values) continue;
      for (const actor of [tenant.owner, operator, { kind: 'key', label: 'key', key: tenant.apiKey } as Actor]) {
        const res = await send(t.app, doc, op, actor, values);
        if (res.status !== 200) continue;
        checked++;
        for (const secret of forbidden) expect(res.text.includes(secret), `${actor.label} GET ${op.path} shows a secret`).toBe(false);
        expect(res.text, `${actor.label} GET ${op.path}`).not.toMatch(forbiddenNames);
        expect(res.text, `${actor.label} GET ${op.path}`).not.toMatch(/\$2[aby]\$\d\d\$/);
      }
    }
    expect(checked).toBeGreaterThan(20);
  });

  it('shows a rotated signing secret once, in the rotation answer only', async () => {
    const id = tenant.fixtures.get('/v1/webhook-endpoints')!;
    const owner = tenant.owner;
    const rotated = await request(t.app).post(`/v1/webhook-endpoints/${id}/rotate-secret`).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf);
    expect(rotated.status).toBe(200);
    const secret: string = rotated.body.secret;
    expect(secret).toMatch(/^whsec_/);
    expect(secret).not.toBe(tenant.secrets.webhookSecret);
    for (const url of [`/v1/webhook-endpoints/${id}`, '/v1/webhook-endpoints', `/v1/webhook-endpoints/${id}/deliveries`]) {
      const res = await request(t.app).get(url).set('Cookie', owner.cookie);
      expect(res.status, url).toBe(200);
      expect(res.text.includes(secret), url).toBe(false);
    }
    const patched = await request(t.app).patch(`/v1/webhook-endpoints/${id}`).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ description: 'renamed' });
    expect(patched.status).toBe(200);
    expect(patched.text.includes(secret)).toBe(false);
  });

  it('shows a new API key once: its list and detail entries carry only the visible prefix', async () => {
    const owner = tenant.owner;
    const created = await request(t.app).post('/v1/api-keys').set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).send({ name: 'shown once', scopes: ['runs:read'] });
    expect(created.status).toBe(201);
    const key: string = created.body.key;
    expect(key).toMatch(/^gw_/);
    for (const url of ['/v1/api-keys', `/v1/api-keys/${created.body.apiKey.id}`]) {
      const res = await request(t.app).get(url).set('Cookie', owner.cookie);
      expect(res.status, `${url}: ${res.text.slice(0, 200)}`).toBe(200);
      expect(res.text.includes(key)).toBe(false);
      expect(res.text.includes(createHash('sha256').update(key).digest('hex'))).toBe(false);
    }
  });
});
