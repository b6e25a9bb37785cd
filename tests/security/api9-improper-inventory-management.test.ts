// OWASP API Security Top 10 (2023), API9 Improper Inventory Management: the routes the server
// answers and the routes openapi/openapi.yaml documents must be the same set, so there is no
// undocumented (and so unvalidated, unreviewed) endpoint and no documented one that is missing.
import express from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ACTIONS } from '../../api/src/auth/permissions';
import { startTestApp, type TestApp } from '../support/test-app';
import { listExpressRoutes } from './support/express-routes';
import { listOperations, fillPath } from './support/openapi-operations';

// The console's single-page fallback (mounted only when console/dist is built) serves HTML for any
// non-API path; it is not part of the HTTP API and refuses /v1 paths (asserted below).
const CONSOLE_FALLBACK = '/{*splat}';

describe('API9 improper inventory management', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(async () => t.close());

  it('mounts exactly the operations openapi.yaml documents', () => {
    const mounted = new Set(
      listExpressRoutes(t.app)
        .filter((r) => r.path !== CONSOLE_FALLBACK)
        .map((r) => `${r.method.toUpperCase()} ${r.path}`),
    );
    const documented = new Set(listOperations().map((o) => `${o.method.toUpperCase()} ${o.path}`));
    const undocumented = [...mounted].filter((r) => !documented.has(r)).sort();
    const unmounted = [...documented].filter((r) => !mounted.has(r)).sort();
    expect({ undocumented, unmounted }).toEqual({ undocumented: [], unmounted: [] });
    expect(mounted.size).toBeGreaterThan(0);
  });

  it('finds the routes it walks (the enumeration itself sees /healthz and /readyz)', () => {
    const mounted = listExpressRoutes(t.app).map((r) => `${r.method} ${r.path}`);
    expect(mounted).toEqual(expect.arrayContaining(['get /healthz', 'get /readyz', 'get /metrics', 'get /openapi.yaml']));
  });

  it('gives every operation a unique operationId, a tag and, when secured, an action of the permission matrix', () => {
    const ops = listOperations();
    const ids = ops.map((o) => o.operationId);
    expect(ids.filter((id, i) => ids.indexOf(id) !== i)).toEqual([]);
    for (const op of ops) {
      expect(op.raw.tags?.length, `${op.operationId} has a tag`).toBeGreaterThan(0);
      if (op.path.startsWith('/v1/') && op.secured) {
        expect(ACTIONS, `${op.method.toUpperCase()} ${op.path} x-permission`).toContain(op.permission);
      }
    }
  });

  it('enforces on each route the very action its operation documents in x-permission', () => {
    const documented = new Map(listOperations().map((o) => [`${o.method} ${o.path}`, o.permission]));
    const mismatches = listExpressRoutes(t.app)
      .filter((r) => r.path.startsWith('/v1/'))
      .map((r) => ({ route: `${r.method.toUpperCase()} ${r.path}`, enforced: r.actions, documented: documented.get(`${r.method} ${r.path}`) ?? null }))
      .filter((m) => (m.documented === null ? m.enforced.length > 0 : m.enforced.length !== 1 || m.enforced[0] !== m.documented));
    expect(mismatches).toEqual([]);
  });

  it('notices a route mounted without documentation (the check itself can fail)', () => {
    const shadow = express.Router();
    shadow.get('/v1/shadow-export', (_req, res) => {
      res.json({});
    });
    const probe = express();
    probe.use(shadow);
    expect(listExpressRoutes(probe)).toEqual([{ method: 'get', path: '/v1/shadow-export', actions: [] }]);
  });

  it('refuses an undocumented /v1 path with a problem+json 404 and an undocumented method on a documented path', async () => {
    const unknown = await request(t.app).get('/v1/internal-debug').set('Accept', 'application/json');
    expect(unknown.status).toBe(404);
    expect(unknown.headers['content-type']).toMatch(/^application\/problem\+json/);
    const ops = listOperations();
    const withoutDelete = [...new Set(ops.map((o) => o.path))].find((p) => p.startsWith('/v1/') && !ops.some((o) => o.path === p && o.method === 'delete'));
    expect(withoutDelete).toBeDefined();
    const res = await request(t.app).delete(fillPath(withoutDelete!, {})).set('Accept', 'application/json');
    expect([404, 405]).toContain(res.status);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  });
});
