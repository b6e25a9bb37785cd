// Tenants, keys and signed-in people for integration tests, made through the real services and routes.
import { randomBytes } from 'node:crypto';
import type { Express } from 'express';
import request from 'supertest';
import { SCOPES, type Role, type Scope, type TenantRole } from '../../api/src/lib/roles-and-scopes';
import type { AppContext } from '../../api/src/context';
import { createApiKey } from '../../api/src/services/api-keys';
import { createMember } from '../../api/src/services/members';
import { createTenant } from '../../api/src/services/tenants';

const suffix = () => randomBytes(4).toString('hex');

/** A tenant (plan `fleet` unless given, so tests are not rate limited) with one API key (all scopes unless given). */
export async function createTenantWithKey(
  ctx: AppContext,
  opts: { slug?: string; plan?: string; scopes?: Scope[] } = {},
): Promise<{ tenantId: string; slug: string; apiKey: string }> {
  const tenant = await createTenant(ctx, { slug: opts.slug ?? `t-${suffix()}`, planId: opts.plan ?? 'fleet' });
  const { key } = await createApiKey(ctx, { tenantId: tenant.id, name: 'test key', scopes: opts.scopes ?? [...SCOPES] }, {});
  return { tenantId: tenant.id, slug: tenant.slug, apiKey: key };
}

/** Extracts `name=value` pairs from Set-Cookie headers into one Cookie header value. */
export function cookieHeader(setCookie: string[] | string | undefined): string {
  const list = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  return list.map((c) => c.split(';')[0]).join('; ');
}

export function csrfFrom(setCookie: string[] | string | undefined): string {
  const pair = cookieHeader(setCookie)
    .split('; ')
    .find((p) => p.startsWith('gw_csrf='));
  return pair ? decodeURIComponent(pair.slice('gw_csrf='.length)) : '';
}

/**
 * A person with `role` in `tenantId`, signed in through POST /v1/auth/sign-in. Send `cookie` as the
 * Cookie header and `csrf` as X-CSRF-Token on unsafe methods. Operators belong to no tenant: to act
 * on `tenantId` they also send `X-Tenant-Id: <tenantId>`.
 */
export async function createUserSession(
  ctx: AppContext,
  app: Express,
  opts: { tenantId: string; role: TenantRole | 'operator'; email?: string; password?: string },
): Promise<{ cookie: string; csrf: string; userId: string; email: string; password: string }> {
  const email = opts.email ?? `${opts.role}-${suffix()}@example.test`;
  const password = opts.password ?? `pw-${randomBytes(12).toString('hex')}`;
  const role: Role = opts.role;
  const user = await ctx.db.transaction((m) => createMember(ctx, m, { tenantId: role === 'operator' ? null : opts.tenantId, email, role, password }));
  const res = await request(app).post('/v1/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in failed in test setup: ${res.status} ${JSON.stringify(res.body)}`);
  const setCookie = res.headers['set-cookie'] as unknown as string[];
  return { cookie: cookieHeader(setCookie), csrf: csrfFrom(setCookie), userId: user.id, email, password };
}
