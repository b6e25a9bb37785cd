// OWASP API Security Top 10 (2023), API9 Improper Inventory Management: the routes the server
// answers and the routes openapi/openapi.yaml documents must be the same set, so there is no
// undocumented (and so unvalidated, unreviewed) endpoint and no documented one that is missing —
// and each is answered under its documented spelling only: another case or a trailing slash is a
// 404 that reaches no handler (a probe once moved records between tenants through `/V1/…`).
import express from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ACTIONS } from '../../api/src/auth/permissions';
import { startTestApp, type TestApp } from '../support/test-app';
import { listExpressRoutes } from './support/express-routes';
import { listOperations, fillPath, loadOpenApi, type Operation } from './support/openapi-operations';
import { exampleBody, sendTo, unknownIds, type Actor } from './support/operation-requests';
import { otherSpellings } from './support/route-spellings';
import { fixtureValues, startAppWithResources, type AppWithResources, type TenantWithResources } from './support/tenant-fixtures';

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

describe('API9 one spelling per route', () => {
  const doc = loadOpenApi();
  let fixture: AppWithResources;
  let t: TestApp;
  let tenant: TenantWithResources;
  const planted = '00000000-0000-4000-8000-00000000abcd';

  // Every row a handler could write, in a stable order; a request that reached one would show here.
  async function databaseSnapshot(): Promise<Record<string, unknown[]>> {
    const tables = ['tenants', 'users', 'sessions', 'api_keys', 'invitations', 'password_resets', 'audit_events', 'export_profiles', 'webhook_endpoints', 'webhook_deliveries', 'runs', 'series'];
    const snap: Record<string, unknown[]> = {};
    for (const table of tables) snap[table] = (await t.ctx.db.query(`SELECT to_jsonb(x) AS row FROM ${table} x ORDER BY id`)).map((r: { row: unknown }) => r.row);
    return snap;
  }

  const actorFor = (op: Operation): Actor => fixture.actorFor(op);

  beforeAll(async () => {
    fixture = await startAppWithResources(doc, 'api9-spelling');
    ({ t, tenant } = fixture);
  });
  afterAll(async () => fixture?.close());

  it('makes the app and every router match case-sensitively and strictly', () => {
    expect([t.app.enabled('case sensitive routing'), t.app.enabled('strict routing')]).toEqual([true, true]);
    const lenient: string[] = [];
    const walk = (stack: any[], where: string) => {
      for (const layer of stack) {
        const router = layer.handle;
        if (!Array.isArray(router?.stack) || layer.route) continue;
        if (router.caseSensitive !== true || router.strict !== true) lenient.push(`${where} > ${layer.name}`);
        walk(router.stack, `${where} > ${layer.name}`);
      }
    };
    walk((t.app as any).router.stack, 'app');
    expect(lenient).toEqual([]);
  });

  it('answers every other spelling of every documented operation with a problem+json 404 (or 405) and writes nothing', async () => {
    const before = await databaseSnapshot();
    const reached: string[] = [];
    let sent = 0;
    for (const op of listOperations(doc)) {
      const url = fillPath(op.path, fixtureValues(op, tenant.fixtures) ?? unknownIds(op));
      const example = exampleBody(doc, op);
      // A body that names another tenant, so a request that reached a handler could plant or move a record.
      const body = example?.contentType === 'application/json' && example.body && typeof example.body === 'object' ? { ...(example.body as object), tenantId: planted } : undefined;
      for (const spelling of otherSpellings(url)) {
        const res = await sendTo(t.app, doc, op, actorFor(op), spelling, body);
        sent++;
        // 405: the spelling happens to fit another documented path (`/v1/members/Invitations` is a member id) that lacks the method.
        const refused = (res.status === 404 || res.status === 405) && /^application\/problem\+json/.test(res.headers['content-type'] ?? '');
        if (!refused) reached.push(`${op.method.toUpperCase()} ${spelling}: ${res.status} ${res.text.slice(0, 120)}`);
      }
    }
    expect(reached).toEqual([]);
    expect(sent).toBeGreaterThan(200);
    expect(await databaseSnapshot()).toEqual(before);
  });

  it('reaches the handler of every read under its documented spelling (the refusals above are not the default)', async () => {
    const failed: string[] = [];
    for (const op of listOperations(doc).filter((o) => o.method === 'get' && o.path.startsWith('/v1/'))) {
      const values = fixtureValues(op, tenant.fixtures);
      if (!values) continue;
      const res = await sendTo(t.app, doc, op, actorFor(op), fillPath(op.path, values));
      // 409: the schedule of a run not solved yet — the handler's own answer.
      if (res.status !== 200 && res.status !== 409) failed.push(`GET ${op.path}: ${res.status}`);
    }
    expect(failed).toEqual([]);
  });

  it('serves no console page for another spelling of an API path, even to a browser', async () => {
    for (const url of ['/V1/runs', '/v1/Runs', '/V1', '/v1/runs/']) {
      const res = await request(t.app).get(url).set('Accept', 'text/html').set('Cookie', tenant.owner.cookie);
      expect(res.status, url).toBe(404);
      expect(res.headers['content-type'], url).toMatch(/^application\/problem\+json/);
    }
  });
});
