// OWASP API Security Top 10 (2023), API1 Broken Object Level Authorization: every operation of
// openapi.yaml that takes a resource id is called by tenant B (API key and signed-in owner, also
// naming tenant A in X-Tenant-Id) with the ids of tenant A's resources: always 404, never 403, with
// nothing of A's in the answer; B's collection reads never list A's resources; and afterwards A's
// resources are exactly as they were. Generated over the document, so a new route is covered.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roleAllows, scopeAllows, type Action } from '../../api/src/auth/permissions';
import { SCOPES } from '../../api/src/lib/roles-and-scopes';
import { createTenantWithKey, createUserSession } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';
import { startWebhookReceiver, type WebhookReceiver } from '../support/webhook-receiver';
import { apiOperations, loadOpenApi, type Operation } from './support/openapi-operations';
import { collectionOf, send, type Actor } from './support/operation-requests';
import { createTenantWithResources } from './support/tenant-fixtures';

const doc = loadOpenApi();
const ops = apiOperations(doc).filter((o) => o.secured && o.permission);
const MARKER = 'tenant-a-private-marker-7f3e';

describe('API1 broken object level authorization', () => {
  let t: TestApp;
  let receiver: WebhookReceiver;
  let a: { tenantId: string; apiKey: string };
  let b: { tenantId: string; apiKey: string };
  let aOwner: Extract<Actor, { kind: 'session' }>;
  const bActors: Actor[] = [];
  /** Tenant A's resource id per collection path, e.g. `/v1/runs` → a run id. */
  const fixtures = new Map<string, string>();

  const aKey = (): Actor => ({ kind: 'key', label: 'tenant A key', key: a.apiKey });

  async function snapshotOfA(): Promise<Record<string, unknown>> {
    const snap: Record<string, unknown> = {};
    for (const op of ops.filter((o) => o.method === 'get')) {
      if (!op.pathParams.every((p) => fixtures.has(collectionOf(op.path, p)))) continue;
      const values = Object.fromEntries(op.pathParams.map((p) => [p, fixtures.get(collectionOf(op.path, p))!]));
      const actor: Actor = permissionFor(op, aKey()) ? aKey() : aOwner;
      const res = await send(t.app, doc, op, actor, values);
      // lastUsedAt and similar bookkeeping change with every call; the objects themselves must not.
      snap[`${op.path}`] = res.status === 200 ? stripVolatile(res.body) : res.status;
    }
    return snap;
  }

  beforeAll(async () => {
    t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '3600' });
    receiver = await startWebhookReceiver();
    const created = await createTenantWithResources(t, doc, { marker: MARKER, receiverUrl: receiver.url });
    a = { tenantId: created.tenantId, apiKey: created.apiKey };
    aOwner = created.owner;
    for (const [k, v] of created.fixtures) fixtures.set(k, v);
    b = await createTenantWithKey(t.ctx);
    const bOwner = await createUserSession(t.ctx, t.app, { tenantId: b.tenantId, role: 'owner' });
    bActors.push(
      { kind: 'key', label: 'tenant B key', key: b.apiKey },
      { kind: 'session', label: 'tenant B owner', cookie: bOwner.cookie, csrf: bOwner.csrf },
      { kind: 'key', label: 'tenant B key naming tenant A', key: b.apiKey, tenantHeader: a.tenantId },
      { kind: 'session', label: 'tenant B owner naming tenant A', cookie: bOwner.cookie, csrf: bOwner.csrf, tenantHeader: a.tenantId },
    );
  });
  afterAll(async () => {
    await receiver?.close();
    await t?.close();
  });

  function permissionFor(op: Operation, actor: Actor): boolean {
    const action = op.permission as Action;
    if (actor.kind === 'key') return scopeAllows([...SCOPES], action);
    if (actor.kind === 'session') return roleAllows('owner', action);
    return false;
  }

  const withIds = ops.filter((o) => o.pathParams.length > 0);

  it('has a tenant A resource for every collection an operation takes an id of', () => {
    const missing = [...new Set(withIds.flatMap((o) => o.pathParams.map((p) => collectionOf(o.path, p))))].filter((c) => !fixtures.has(c));
    expect(missing).toEqual([]);
  });

  it('answers 404 with nothing of tenant A to tenant B on every operation that takes an id', async () => {
    const before = await snapshotOfA();
    const failures: string[] = [];
    for (const op of withIds) {
      const values = Object.fromEntries(op.pathParams.map((p) => [p, fixtures.get(collectionOf(op.path, p))!]));
      for (const actor of bActors) {
        if (!permissionFor(op, actor)) continue;
        const res = await send(t.app, doc, op, actor, values);
        const where = `${actor.label} ${op.method.toUpperCase()} ${op.path}`;
        if (res.status !== 404) failures.push(`${where}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
        else if (res.text.includes(MARKER) || res.text.includes(a.tenantId)) failures.push(`${where}: 404 body mentions tenant A`);
        else if (!String(res.headers['content-type']).startsWith('application/problem+json')) failures.push(`${where}: 404 is not problem+json`);
      }
    }
    expect(failures).toEqual([]);
    expect(await snapshotOfA()).toEqual(before);
  });

  it("never lists tenant A's resources in tenant B's collection reads", async () => {
    const leaks: string[] = [];
    for (const op of ops.filter((o) => o.method === 'get' && o.pathParams.length === 0)) {
      for (const actor of bActors) {
        if (!permissionFor(op, actor)) continue;
        const res = await send(t.app, doc, op, actor, {});
        const text = res.text;
        const seen = [MARKER, a.tenantId, ...fixtures.values()].filter((v) => text.includes(v));
        if (seen.length) leaks.push(`${actor.label} GET ${op.path} shows ${seen.join(', ')}`);
        if (res.status >= 500) leaks.push(`${actor.label} GET ${op.path}: ${res.status}`);
      }
    }
    expect(leaks).toEqual([]);
  });

  it('keeps tenant A able to read each of its resources (the fixtures are real, the 404s are not for everyone)', async () => {
    for (const op of withIds.filter((o) => o.method === 'get' && permissionFor(o, aKey()))) {
      const values = Object.fromEntries(op.pathParams.map((p) => [p, fixtures.get(collectionOf(op.path, p))!]));
      const res = await send(t.app, doc, op, aKey(), values);
      expect([200, 409], `${op.method.toUpperCase()} ${op.path}: ${res.status} ${res.text.slice(0, 200)}`).toContain(res.status);
    }
  });
});

function stripVolatile(body: unknown): unknown {
  if (Array.isArray(body)) return body.map(stripVolatile);
  if (body && typeof body === 'object') {
    return Object.fromEntries(
      Object.entries(body as Record<string, unknown>)
        .filter(([k]) => !['lastUsedAt', 'progress', 'updatedAt'].includes(k))
        .map(([k, v]) => [k, stripVolatile(v)]),
    );
  }
  return body;
}
