// Every documented /v1 operation × every role and key scope, generated from the permission matrix
// (api/src/auth/permissions.ts) and the `x-permission` each operation declares in openapi.yaml.
import { randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import request from 'supertest';
import { parse as parseYaml } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openapiPath } from '../../../api/src/app';
import { v1Operations } from '../../../api/src/auth/permission-docs';
import { isAction, roleAllows, scopeAllows, type Action } from '../../../api/src/auth/permissions';
import { SCOPES, type Role, type Scope } from '../../../api/src/lib/roles-and-scopes';
import { createApiKey } from '../../../api/src/services/api-keys';
import { updateTenant } from '../../../api/src/services/tenants';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

const doc = parseYaml(readFileSync(openapiPath, 'utf8'));
const operations = v1Operations(doc);
const isPublic = (op: (typeof operations)[number]) => Array.isArray(op.operation.security) && op.operation.security.length === 0;
const protectedOps = operations.filter((op) => !isPublic(op));
// These end the caller's own sessions when allowed, so each call gets a fresh one.
const SESSION_ENDING = new Set(['post /v1/auth/sign-out', 'post /v1/auth/password']);

function resolveRef(value: any): any {
  if (value && typeof value === 'object' && typeof value.$ref === 'string' && value.$ref.startsWith('#/')) {
    return resolveRef(value.$ref.slice(2).split('/').reduce((node: any, key: string) => node?.[key], doc));
  }
  return value;
}

function exampleBody(op: (typeof operations)[number]): { type: string; body: unknown } | null {
  const content = op.operation.requestBody ? resolveRef((op.operation.requestBody as any).content) : null;
  if (!content) return null;
  const [type, media] = Object.entries(content)[0] as [string, any];
  const example = media.example ?? resolveRef(Object.values(media.examples ?? {})[0])?.value;
  return { type, body: example ?? {} };
}

function concretePath(path: string) {
  return path.replace(/\{[^}]+\}/g, () => randomUUID());
}

/** The operation's own example as the request, so the validator lets it through to authentication. */
function send(op: (typeof operations)[number], headers: Record<string, string>) {
  const example = exampleBody(op);
  let req = (request(t.app) as any)[op.method](concretePath(op.path)).set(headers);
  if (example?.type === 'application/json') req = req.send(example.body);
  else if (example?.type === 'multipart/form-data') req = req.attach('file', Buffer.from('timestamp,kw\n2027-03-01T00:00:00+01:00,1\n'), 'series.csv');
  return req as Promise<request.Response>;
}

let t: TestApp;

interface Caller {
  label: string;
  allowed(action: Action): boolean;
  headers(): Promise<Record<string, string>>;
}

describe('the permission matrix, route by route', () => {
  let callers: Caller[];

  beforeAll(async () => {
    t = await startTestApp();
    const { tenantId } = await createTenantWithKey(t.ctx);
    await updateTenant(t.ctx, tenantId, { limitOverrides: { requestsPerSecond: 100_000 } }, {});
    const session = async (role: Role) => {
      const s = await createUserSession(t.ctx, t.app, { tenantId, role });
      return { Cookie: s.cookie, 'X-CSRF-Token': s.csrf, ...(role === 'operator' ? { 'X-Tenant-Id': tenantId } : {}) };
    };
    const roles: Role[] = ['owner', 'developer', 'viewer', 'operator'];
    callers = [];
    for (const role of roles) {
      const fixed = await session(role);
      callers.push({
        label: `${role} session`,
        allowed: (a) => roleAllows(role, a),
        headers: async () => fixed,
      });
      callers.push({ label: `${role} fresh session`, allowed: (a) => roleAllows(role, a), headers: () => session(role) });
    }
    // A key without scopes cannot exist (the service and the database refuse one); each single scope is a caller.
    await expect(createApiKey(t.ctx, { tenantId, name: 'no scope', scopes: [] }, {})).rejects.toMatchObject({ status: 400 });
    for (const scopes of SCOPES.map((s) => [s]) as Scope[][]) {
      const { key } = await createApiKey(t.ctx, { tenantId, name: `probe ${scopes.join(',') || 'none'}`, scopes }, {});
      callers.push({
        label: `API key with ${scopes.join(',') || 'no scope'}`,
        allowed: (a) => scopeAllows(scopes, a),
        headers: async () => ({ Authorization: `Bearer ${key}` }),
      });
    }
  });
  afterAll(async () => t.close());

  it('has an action of the matrix on every operation that is not public', () => {
    const missing = protectedOps.filter((op) => !op.action || !isAction(op.action)).map((op) => `${op.method.toUpperCase()} ${op.path}: x-permission ${op.action ?? 'missing'}`);
    expect(missing).toEqual([]);
    expect(protectedOps.length).toBeGreaterThan(20);
  });

  // One test per operation: a failure names the route, and no single test carries the whole matrix.
  for (const op of protectedOps) {
    const key = `${op.method} ${op.path}`;
    it(`${op.method.toUpperCase()} ${op.path} (${op.action}): 403 naming the action exactly where the matrix says no`, async () => {
      const action = op.action as Action;
      if (!isAction(action)) return;
      const wrong: string[] = [];
      for (const caller of callers) {
        const fresh = caller.label.includes('fresh');
        if (fresh !== SESSION_ENDING.has(key) && caller.label.includes('session')) continue;
        const res = await send(op, await caller.headers());
        const refused = res.status === 403 && res.body?.type === '/problems/forbidden';
        const expectRefusal = !caller.allowed(action);
        if (expectRefusal && !(refused && res.body.action === action)) wrong.push(`${caller.label}: expected 403 for ${action}, got ${res.status} ${res.body?.type ?? ''}`);
        if (!expectRefusal && (refused || res.status === 401)) wrong.push(`${caller.label}: expected ${action} to be allowed, got ${res.status} ${res.body?.detail ?? ''}`);
      }
      expect(wrong).toEqual([]);
    });
  }

  it('refuses every protected operation without credentials (401 problem+json)', async () => {
    for (const op of protectedOps) {
      const res = await send(op, {});
      expect(res.status, `${op.method} ${op.path}`).toBe(401);
      expect(res.headers['content-type']).toMatch(/application\/problem\+json/);
    }
  });
});
