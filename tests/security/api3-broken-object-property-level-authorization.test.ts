// OWASP API Security Top 10 (2023), API3 Broken Object Property Level Authorization: properties a
// client must not set (tenantId, role, plan, ids, hashes) are refused wherever a body is accepted
// — generated over every JSON request body in openapi.yaml, under the documented spelling and every
// other one — and no response ever carries a password hash, an API key or its hash, or a webhook
// signing secret after the one that created it. Behind the routes, the services refuse a role, a
// scope or a limit override they did not decide, and the database refuses each of them too.
import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InputGuards1780000500000 } from '../../api/src/db/migrations/1780000500000-input-guards';
import { RevisionsAndStudies1780000770000 } from '../../api/src/db/migrations/1780000770000-revisions-and-studies';
import { RunChangeNotices1780000780000 } from '../../api/src/db/migrations/1780000780000-run-change-notices';
import { SeriesKinds1780000710000 } from '../../api/src/db/migrations/1780000710000-series-kinds';
import { createApiKey } from '../../api/src/services/api-keys';
import { updateExportProfile } from '../../api/src/services/export-profiles';
import { changeMemberRole, inviteMember } from '../../api/src/services/members';
import { updateTenant } from '../../api/src/services/tenants';
import { createTenantWithKey, createUserSession } from '../support/tenants';
import { startTestApp, type TestApp } from '../support/test-app';
import { apiOperations, fillPath, loadOpenApi, resolveRef, type Operation } from './support/openapi-operations';
import { exampleBody, send, sendTo, unknownIds, type Actor } from './support/operation-requests';
import { otherSpellings } from './support/route-spellings';
import { fixtureValues, startAppWithResources, type AppWithResources, type TenantWithResources } from './support/tenant-fixtures';

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
  let fixture: AppWithResources;
  let t: TestApp;
  let tenant: TenantWithResources;
  let operator: Actor;

  beforeAll(async () => {
    fixture = await startAppWithResources(doc, 'api3-marker');
    ({ t, tenant, operator } = fixture);
  });
  afterAll(async () => fixture?.close());

  const actorFor = (op: Operation): Actor => fixture.actorFor(op);

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

  for (const op of jsonBodyOps) {
    it(`${op.method.toUpperCase()} ${op.path}: planted properties under any other spelling reach nothing (404)`, async () => {
      const base = exampleBody(doc, op)!.body as Record<string, unknown>;
      const url = fillPath(op.path, fixtureValues(op, tenant.fixtures) ?? unknownIds(op));
      for (const spelling of otherSpellings(url)) {
        const res = await sendTo(t.app, doc, op, actorFor(op), spelling, { ...base, ...SMUGGLED });
        expect([404, 405], `${spelling}: ${res.text.slice(0, 200)}`).toContain(res.status);
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

describe('API3 behind the routes: the services and the database refuse what a body must not set', () => {
  let t: TestApp;
  let a: { tenantId: string };
  let b: { tenantId: string };
  let developerId: string;

  beforeAll(async () => {
    t = await startTestApp();
    a = await createTenantWithKey(t.ctx);
    b = await createTenantWithKey(t.ctx);
    developerId = (await createUserSession(t.ctx, t.app, { tenantId: a.tenantId, role: 'developer' })).userId;
  });
  afterAll(async () => t?.close());

  const pointersOf = (err: any) => (err?.errors ?? []).map((e: { pointer: string }) => e.pointer);

  it('refuses the operator role for a tenant member, whoever calls the service', async () => {
    await expect(changeMemberRole(t.ctx, a.tenantId, developerId, 'operator' as never, {})).rejects.toMatchObject({ status: 400 });
    await expect(inviteMember(t.ctx, { tenantId: a.tenantId, email: 'x@example.test', role: 'operator' as never, invitedBy: null }, {})).rejects.toMatchObject({ status: 400 });
    const [row] = await t.ctx.db.query(`SELECT role FROM users WHERE id = $1`, [developerId]);
    expect(row.role).toBe('developer');
  });

  it('refuses scopes an API key cannot have, naming each', async () => {
    const bad = await createApiKey(t.ctx, { tenantId: a.tenantId, name: 'planted', scopes: ['runs:read', 'admin' as never] }, {}).catch((e) => e);
    expect(bad.status).toBe(400);
    expect(pointersOf(bad)).toEqual(['/scopes/1']);
    expect(pointersOf(await createApiKey(t.ctx, { tenantId: a.tenantId, name: 'none', scopes: [] }, {}).catch((e) => e))).toEqual(['/scopes']);
  });

  it('refuses limit overrides that are not numbers in their range, naming each, and changes nothing', async () => {
    const overrides = { monthlyRuns: 'unlimited', requestsPerSecond: 0, maxSteps: 1e9, concurrentRuns: 1.5, monthlySolverSeconds: -1, bogus: 1 };
    const err = await updateTenant(t.ctx, a.tenantId, { limitOverrides: overrides as never }, {}).catch((e) => e);
    expect(err.status).toBe(400);
    expect(pointersOf(err).sort()).toEqual(Object.keys(overrides).map((k) => `/limitOverrides/${k}`).sort());
    const [row] = await t.ctx.db.query(`SELECT limit_overrides FROM tenants WHERE id = $1`, [a.tenantId]);
    expect(row.limit_overrides).toEqual({});
    await updateTenant(t.ctx, a.tenantId, { limitOverrides: { monthlyRuns: 5, requestsPerSecond: 0.1 } }, {});
    const [changed] = await t.ctx.db.query(`SELECT limit_overrides FROM tenants WHERE id = $1`, [a.tenantId]);
    expect(changed.limit_overrides).toEqual({ monthlyRuns: 5, requestsPerSecond: 0.1 });
  });

  it('never lets an export profile patch move the profile or change its id', async () => {
    const [{ id }] = await t.ctx.db.query(`INSERT INTO export_profiles (tenant_id, name) VALUES ($1, 'kept') RETURNING id`, [a.tenantId]);
    await updateExportProfile(t.ctx, a.tenantId, id, { name: 'renamed', tenantId: b.tenantId, id: '00000000-0000-4000-8000-000000000009' } as never);
    const rows = await t.ctx.db.query(`SELECT id, tenant_id, name FROM export_profiles WHERE name = 'renamed'`);
    expect(rows).toEqual([{ id, tenant_id: a.tenantId, name: 'renamed' }]);
  });

  it('refuses, in the database, each value a service should have refused', async () => {
    const [seriesOfB] = await t.ctx.db.query(
      `INSERT INTO series (tenant_id, name, source_column, source_unit, start, start_offset, step_minutes, steps, step_values, source_rows, fill_policy)
       VALUES ($1, 'b', 'pv', 'kW', now(), '+00:00', 60, 2, '[1, 2]', 2, 'none') RETURNING id`,
      [b.tenantId],
    );
    const [runOfB] = await t.ctx.db.query(`INSERT INTO runs (tenant_id, spec, steps, units, time_limit_seconds) VALUES ($1, '{}', 2, 0, 30) RETURNING id`, [b.tenantId]);
    const [endpointOfB] = await t.ctx.db.query(`INSERT INTO webhook_endpoints (tenant_id, url, events, secret) VALUES ($1, 'https://93.184.216.34/', '{run.succeeded}', 's') RETURNING id`, [b.tenantId]);
    const series = (values: string, steps = 2) =>
      t.ctx.db.query(
        `INSERT INTO series (tenant_id, name, source_column, source_unit, start, start_offset, step_minutes, steps, step_values, source_rows, fill_policy)
         VALUES ($1, 'a', 'pv', 'kW', now(), '+00:00', 60, $2, $3, 2, 'none')`,
        [a.tenantId, steps, values],
      );
    const refused: [string, () => Promise<unknown>, string][] = [
      ['a tenant member with the operator role', () => t.ctx.db.query(`UPDATE users SET role = 'operator' WHERE id = $1`, [developerId]), '23514'],
      ['an unknown key scope', () => t.ctx.db.query(`INSERT INTO api_keys (tenant_id, name, prefix, secret_hash, scopes) VALUES ($1, 'k', 'aaaaaaaaaaaa', 'h', '{runs:read,admin}')`, [a.tenantId]), '23514'],
      ['a key without scopes', () => t.ctx.db.query(`INSERT INTO api_keys (tenant_id, name, prefix, secret_hash, scopes) VALUES ($1, 'k', 'bbbbbbbbbbbb', 'h', '{}')`, [a.tenantId]), '23514'],
      ['a limit override that is text', () => t.ctx.db.query(`UPDATE tenants SET limit_overrides = '{"monthlyRuns": "unlimited"}' WHERE id = $1`, [a.tenantId]), '23514'],
      ['a limit override out of range', () => t.ctx.db.query(`UPDATE tenants SET limit_overrides = '{"requestsPerSecond": 0}' WHERE id = $1`, [a.tenantId]), '23514'],
      ['an unknown limit', () => t.ctx.db.query(`UPDATE tenants SET limit_overrides = '{"bogus": 1}' WHERE id = $1`, [a.tenantId]), '23514'],
      ['an export delimiter of its own', () => t.ctx.db.query(`INSERT INTO export_profiles (tenant_id, name, delimiter) VALUES ($1, 'd', 'x')`, [a.tenantId]), '23514'],
      ['a tag map with a non-text tag', () => t.ctx.db.query(`INSERT INTO export_profiles (tenant_id, name, tag_map) VALUES ($1, 't', '{"a": 1}')`, [a.tenantId]), '23514'],
      ['an unknown webhook event', () => t.ctx.db.query(`INSERT INTO webhook_endpoints (tenant_id, url, events, secret) VALUES ($1, 'https://93.184.216.34/', '{run.any}', 's')`, [a.tenantId]), '23514'],
      ['a series value of 1e203 kW', () => series('[1e203, 1]'), '23514'],
      ['a series value that is null', () => series('[null, 1]'), '23514'],
      ['a series value below the smallest non-zero power', () => series('[1e-9, 1]'), '23514'],
      ['a series whose length is not its steps', () => series('[1, 1, 1]'), '23514'],
      ["a run on another tenant's series", () => t.ctx.db.query(`INSERT INTO runs (tenant_id, spec, series_id, steps, units, time_limit_seconds) VALUES ($1, '{}', $2, 2, 0, 30)`, [a.tenantId, seriesOfB.id]), '23503'],
      ['a run of no steps', () => t.ctx.db.query(`INSERT INTO runs (tenant_id, spec, steps, units, time_limit_seconds) VALUES ($1, '{}', 0, 0, 30)`, [a.tenantId]), '23514'],
      ["a delivery to another tenant's endpoint", () => t.ctx.db.query(`INSERT INTO webhook_deliveries (tenant_id, endpoint_id, event, message_id, payload) VALUES ($1, $2, 'webhook.test', 'msg_x1', '{}')`, [a.tenantId, endpointOfB.id]), '23503'],
      ["an Idempotency-Key naming another tenant's run", () => t.ctx.db.query(`INSERT INTO idempotency_keys (tenant_id, key, fingerprint, run_id, expires_at) VALUES ($1, 'k', 'f', $2, now())`, [a.tenantId, runOfB.id]), '23503'],
    ];
    const accepted: string[] = [];
    for (const [what, write, code] of refused) {
      const err: any = await write().then(() => null, (e) => e);
      if ((err?.code ?? err?.driverError?.code) !== code) accepted.push(`${what}: ${err ? `${err.code} ${err.message}` : 'stored'}`);
    }
    expect(accepted).toEqual([]);
  });

  it('cleans privileges planted before the guards existed: unknown scopes dropped and their keys revoked, bad overrides removed', async () => {
    const guards = new InputGuards1780000500000();
    // Later migrations lean on what the guards made (their (id, tenant_id) keys, the series constraint's
    // column): they step aside, newest first, and come back after the guards.
    const later = [new SeriesKinds1780000710000(), new RevisionsAndStudies1780000770000(), new RunChangeNotices1780000780000()];
    const q = t.ctx.db.createQueryRunner();
    try {
      for (const m of [...later].reverse()) await m.down(q);
      await guards.down(q);
      const [key] = await q.query(`INSERT INTO api_keys (tenant_id, name, prefix, secret_hash, scopes) VALUES ($1, 'planted', 'cccccccccccc', 'h', '{runs:read,admin}') RETURNING id`, [a.tenantId]);
      await q.query(`UPDATE tenants SET limit_overrides = '{"monthlyRuns": "unlimited", "maxUnits": 3, "bogus": 1, "requestsPerSecond": 0}' WHERE id = $1`, [a.tenantId]);
      await guards.up(q);
      for (const m of later) await m.up(q);
      const [cleaned] = await q.query(`SELECT scopes, revoked_at IS NOT NULL AS revoked FROM api_keys WHERE id = $1`, [key.id]);
      expect(cleaned).toEqual({ scopes: ['runs:read'], revoked: true });
      const [tenant] = await q.query(`SELECT limit_overrides FROM tenants WHERE id = $1`, [a.tenantId]);
      expect(tenant.limit_overrides).toEqual({ maxUnits: 3 });
    } finally {
      await q.release();
    }
  });
});
