// OWASP API Security Top 10 (2023), API5 Broken Function Level Authorization: the full
// role × route and scope × route matrix, generated from openapi.yaml (`x-permission` on every
// operation) and the permission matrix in api/src/auth/permissions.ts, so a new route is covered
// as soon as it is documented. Path ids name nothing, so an allowed call changes nothing (404).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { permissions, roleAllows, type Action } from '../../api/src/auth/permissions';
import { ROLES, SCOPES, type Role, type Scope } from '../../api/src/lib/roles-and-scopes';
import { createApiKey } from '../../api/src/services/api-keys';
import { createTenantWithKey, createUserSession } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';
import { apiOperations, loadOpenApi, type Operation } from './support/openapi-operations';
import { send, unknownIds, type Actor } from './support/operation-requests';

const REFUSAL_TYPES = ['/problems/forbidden', '/problems/unauthenticated', '/problems/csrf-failed', '/problems/tenant-not-selected'];
const doc = loadOpenApi();
const ops = apiOperations(doc).filter((o) => o.secured);

function describeResponse(res: { status: number; body: any }) {
  return `${res.status} ${res.body?.type ?? ''} ${res.body?.detail ?? ''}`.slice(0, 300);
}

describe('API5 broken function level authorization', () => {
  let t: TestApp;
  let tenantId: string;
  const sessions = new Map<Role, Actor>();
  const keys = new Map<Scope | 'none', Actor>();

  async function sessionFor(role: Role): Promise<Actor> {
    const s = await createUserSession(t.ctx, t.app, { tenantId, role });
    return { kind: 'session', label: `${role} session`, cookie: s.cookie, csrf: s.csrf, ...(role === 'operator' ? { tenantHeader: tenantId } : {}) };
  }

  beforeAll(async () => {
    // A long rate-limit window: the matrix sends hundreds of requests for one tenant.
    t = await startTestApp({ RATE_LIMIT_WINDOW_SECONDS: '3600' });
    ({ tenantId } = await createTenantWithKey(t.ctx));
    for (const role of ROLES) sessions.set(role, await sessionFor(role));
    for (const scope of SCOPES) {
      const { key } = await createApiKey(t.ctx, { tenantId, name: `only ${scope}`, scopes: [scope] }, {});
      keys.set(scope, { kind: 'key', label: `key with only ${scope}`, key });
    }
  });
  afterAll(async () => t.close());

  it('covers every secured /v1 operation with an action of the matrix', () => {
    expect(ops.length).toBeGreaterThan(30);
    for (const op of ops) expect(Object.keys(permissions), `${op.method} ${op.path}`).toContain(op.permission);
  });

  // Sign-out and password change end the session they are sent with; each gets a fresh one.
  const endsSession = (op: Operation) => op.permission === 'account.self' && op.method !== 'get';

  for (const op of ops) {
    const action = op.permission as Action;
    const name = `${op.method.toUpperCase()} ${op.path}`;

    it(`${name}: refuses a request without credentials with 401`, async () => {
      const res = await send(t.app, doc, op, { kind: 'anonymous', label: 'nobody' }, unknownIds(op));
      expect(res.status, describeResponse(res)).toBe(401);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    });

    it(`${name}: lets exactly the roles of ${action} through (${permissions[action].roles.join(', ')})`, async () => {
      for (const role of ROLES) {
        const actor = endsSession(op) ? await sessionFor(role) : sessions.get(role)!;
        const res = await send(t.app, doc, op, actor, unknownIds(op));
        if (roleAllows(role, action)) {
          expect(REFUSAL_TYPES, `${role} may ${action}: ${describeResponse(res)}`).not.toContain(res.body?.type);
          expect(res.status, `${role}: ${describeResponse(res)}`).toBeLessThan(500);
        } else {
          expect(res.status, `${role} may not ${action}: ${describeResponse(res)}`).toBe(403);
          expect(res.body.type).toBe('/problems/forbidden');
        }
      }
    });

    it(`${name}: lets exactly keys with ${permissions[action].keyScope ?? 'no scope (keys may not)'} through`, async () => {
      for (const scope of SCOPES) {
        const res = await send(t.app, doc, op, keys.get(scope)!, unknownIds(op));
        if (permissions[action].keyScope === scope) {
          expect(REFUSAL_TYPES, `${scope} grants ${action}: ${describeResponse(res)}`).not.toContain(res.body?.type);
          expect(res.status, `${scope}: ${describeResponse(res)}`).toBeLessThan(500);
        } else {
          expect(res.status, `${scope} does not grant ${action}: ${describeResponse(res)}`).toBe(403);
          expect(res.body.type).toBe('/problems/forbidden');
        }
      }
    });
  }

  it('refuses an unsafe request of a signed-in session without the CSRF header', async () => {
    const owner = sessions.get('owner')! as Extract<Actor, { kind: 'session' }>;
    const op = ops.find((o) => o.method === 'post' && o.path === '/v1/runs')!;
    const res = await send(t.app, doc, op, { ...owner, csrf: '' }, {});
    expect(res.status).toBe(403);
    expect(res.body.type).toBe('/problems/csrf-failed');
  });
});
