// Two API processes on one database, as when the API scales out: each is an app with its own
// connection pool and its own cache of keys and tenants. A change made through one must take effect
// in the other through the change notice alone: the caches keep entries for an hour here, so only
// the notice (or, where a test says so, a one-second time to live) can explain a refusal.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { credentialCacheFor } from '../../../api/src/services/credential-cache';
import { setTenantSuspended, updateTenant } from '../../../api/src/services/tenants';
import { eventually } from '../../support/eventually';
import { createTenantWithKey, createUserSession } from '../../support/tenants';
import { startTestApp, type TestApp } from '../../support/test-app';

const HOUR = { CREDENTIAL_CACHE_SECONDS: '3600' };

describe('cached keys and tenants across API processes', () => {
  let a: TestApp;
  let b: TestApp;
  beforeAll(async () => {
    a = await startTestApp(HOUR);
    b = await startTestApp({ ...HOUR, DATABASE_URL: a.databaseUrl });
  });
  afterAll(async () => {
    await b?.close();
    await a?.close();
  });

  const getUsage = (app: TestApp, key: string) => request(app.app).get('/v1/usage').set('Authorization', `Bearer ${key}`);

  /** Serves `key` from `app` until the key is in that process's cache, so a later refusal cannot be a first lookup. */
  async function cachedIn(app: TestApp, key: string): Promise<void> {
    await eventually(`the key in ${app === a ? 'A' : 'B'}'s cache`, async () => {
      expect((await getUsage(app, key)).status).toBe(200);
      return credentialCacheFor(app.ctx).apiKeys.size > 0 && [...credentialCacheFor(app.ctx).apiKeys.values()].some((k) => key.startsWith(`gw_${k.prefix}_`)) ? true : undefined;
    });
  }

  const refusedBy = (app: TestApp, key: string, status: number) =>
    eventually(`status ${status} from ${app === a ? 'A' : 'B'}`, async () => {
      const res = await getUsage(app, key);
      return res.status === status ? res : undefined;
    });

  it('refuses a key in process B once process A has revoked it', async () => {
    const { tenantId, apiKey } = await createTenantWithKey(a.ctx);
    const owner = await createUserSession(a.ctx, a.app, { tenantId, role: 'owner' });
    await cachedIn(b, apiKey);
    const keys = await request(a.app).get('/v1/api-keys').set('Cookie', owner.cookie).expect(200);
    await request(a.app).post(`/v1/api-keys/${keys.body.items[0].id}/revoke`).set('Cookie', owner.cookie).set('X-CSRF-Token', owner.csrf).expect(200);
    // A dropped its own copy before answering; B on the notice.
    const inA = await getUsage(a, apiKey).expect(401);
    expect(inA.body.detail).toMatch(/revoked/);
    const inB = await refusedBy(b, apiKey, 401);
    expect(inB.body.detail).toMatch(/revoked/);
  });

  it("refuses a suspended tenant's key in B, and serves it again after A resumes the tenant", async () => {
    const { tenantId, apiKey } = await createTenantWithKey(a.ctx);
    await cachedIn(b, apiKey);
    await setTenantSuspended(a.ctx, tenantId, true, 'invoice overdue', {});
    await getUsage(a, apiKey).expect(403);
    const suspended = await refusedBy(b, apiKey, 403);
    expect(suspended.body.type).toBe('/problems/tenant-suspended');
    await setTenantSuspended(a.ctx, tenantId, false, null, {});
    await refusedBy(b, apiKey, 200);
  });

  it("applies a plan change made in A to B's rate limits", async () => {
    const { tenantId, apiKey } = await createTenantWithKey(a.ctx, { plan: 'fleet' });
    await cachedIn(b, apiKey);
    const window = b.ctx.config.rateLimitWindowSeconds;
    expect((await getUsage(b, apiKey)).headers['ratelimit-policy']).toContain(`"credential";q=${100 * window};`);
    await updateTenant(a.ctx, tenantId, { planId: 'pilot' }, {});
    await eventually("B's RateLimit-Policy to follow the pilot plan", async () => {
      const policy = (await getUsage(b, apiKey)).headers['ratelimit-policy'] as string;
      return policy.includes(`"credential";q=${5 * window};`) ? policy : undefined;
    });
  });

  it('drops everything when its listening connection is cut, listens again, and still hears a revocation', async () => {
    const { tenantId, apiKey } = await createTenantWithKey(a.ctx);
    await cachedIn(b, apiKey);
    const listeners = () =>
      b.ctx.db.query(`SELECT pid FROM pg_stat_activity WHERE datname = current_database() AND query = 'LISTEN credential_changes' AND pid <> pg_backend_pid()`) as Promise<{ pid: number }[]>;
    // Both apps listen; cut them all, then wait for both to listen again on fresh connections.
    const before = (await listeners()).map((r) => r.pid);
    expect(before.length).toBeGreaterThanOrEqual(2);
    await b.ctx.db.query('SELECT pg_terminate_backend(pid) FROM unnest($1::int[]) AS pid', [before]);
    // Notices sent while it is deaf are lost, so it keeps nothing it could no longer hear about.
    await eventually('B to drop its cache', async () => (credentialCacheFor(b.ctx).apiKeys.size === 0 ? true : undefined));
    await eventually('both apps to listen again', async () => {
      const now = (await listeners()).map((r) => r.pid);
      return now.length >= 2 && now.every((pid) => !before.includes(pid)) ? now : undefined;
    });
    await cachedIn(b, apiKey);
    await a.ctx.db.query(`UPDATE api_keys SET revoked_at = now() WHERE tenant_id = $1`, [tenantId]);
    const refused = await refusedBy(b, apiKey, 401);
    expect(refused.body.detail).toMatch(/revoked/);
  });
});

describe('a missed change notice', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ CREDENTIAL_CACHE_SECONDS: '1' });
  });
  afterAll(async () => t?.close());

  it('is made good by the time to live: a key revoked without a notice is refused once its entry expires', async () => {
    const { tenantId, apiKey } = await createTenantWithKey(t.ctx);
    await eventually('the key in the cache', async () => {
      expect((await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${apiKey}`)).status).toBe(200);
      return credentialCacheFor(t.ctx).apiKeys.size > 0 ? true : undefined;
    });
    // Triggers do not fire for a session in replica mode: the revocation sends no notice.
    await t.ctx.db.transaction(async (m) => {
      await m.query(`SET LOCAL session_replication_role = replica`);
      await m.query(`UPDATE api_keys SET revoked_at = now() WHERE tenant_id = $1`, [tenantId]);
    });
    const refused = await eventually('the revoked key to be refused', async () => {
      const res = await request(t.app).get('/v1/usage').set('Authorization', `Bearer ${apiKey}`);
      return res.status === 401 ? res : undefined;
    });
    expect(refused.body.detail).toMatch(/revoked/);
  });
});
