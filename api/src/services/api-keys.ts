import { randomBytes } from 'node:crypto';
import { IsNull } from 'typeorm';
import type { AppContext } from '../context';
import { ApiKey } from '../db/entities/api-key';
import { pageNewestFirst, type PageQuery } from '../lib/pagination';
import { HttpProblem, notFound, validationProblem } from '../lib/problem';
import { SCOPES, type Scope } from '../lib/roles-and-scopes';
import { safeEqual, sha256Hex } from '../lib/secret-tokens';
import { isUuid } from '../lib/uuid';
import { recordAudit, type AuditActor } from './audit';
import { credentialCacheFor, forgetCredentialChange } from './credential-cache';

// `gw_<12 hex: prefix, stored and shown>_<43 base64url: secret>`; the whole key is hashed.
const KEY_FORMAT = /^gw_([0-9a-f]{12})_([A-Za-z0-9_-]{43})$/;

// Writing last_used_at on every request would turn each read into a write; once a minute is enough.
const LAST_USED_RESOLUTION_MS = 60_000;

export function parseApiKey(raw: string): { prefix: string } | null {
  const m = KEY_FORMAT.exec(raw);
  return m ? { prefix: m[1]! } : null;
}

/** The scopes a key may carry: at least one, each of SCOPES (the database refuses any other). */
function checkedScopes(scopes: unknown): Scope[] {
  if (!Array.isArray(scopes) || scopes.length === 0) throw validationProblem([{ pointer: '/scopes', message: `at least one of ${SCOPES.join(', ')}` }]);
  const unknown = scopes.findIndex((s) => !SCOPES.includes(s));
  if (unknown >= 0) throw validationProblem([{ pointer: `/scopes/${unknown}`, message: `one of ${SCOPES.join(', ')}` }]);
  return [...new Set(scopes as Scope[])];
}

export async function createApiKey(
  ctx: AppContext,
  input: { tenantId: string; name: string; scopes: Scope[]; expiresAt?: Date | null; createdBy?: string | null },
  actor: AuditActor,
): Promise<{ key: string; apiKey: ApiKey }> {
  const scopes = checkedScopes(input.scopes);
  if (input.expiresAt && input.expiresAt.getTime() <= Date.now()) {
    throw validationProblem([{ pointer: '/expiresAt', message: 'must be in the future' }]);
  }
  const prefix = randomBytes(6).toString('hex');
  const key = `gw_${prefix}_${randomBytes(32).toString('base64url')}`;
  return ctx.db.transaction(async (m) => {
    const row = m.create(ApiKey, {
      tenantId: input.tenantId,
      name: input.name,
      prefix,
      secretHash: sha256Hex(key),
      scopes,
      expiresAt: input.expiresAt ?? null,
      revokedAt: null,
      lastUsedAt: null,
      createdBy: input.createdBy ?? null,
    });
    await m.insert(ApiKey, row);
    const apiKey = await m.findOneByOrFail(ApiKey, { id: row.id });
    await recordAudit(m, { tenantId: input.tenantId, action: 'key-created', actor, target: `${input.name} (gw_${prefix})`, details: { apiKeyId: row.id, scopes: row.scopes } });
    return { key, apiKey };
  });
}

/** The key row for a presented key, or the reason it does not authenticate. */
export async function verifyApiKey(ctx: AppContext, raw: string): Promise<{ ok: true; apiKey: ApiKey } | { ok: false; reason: string }> {
  const parsed = parseApiKey(raw);
  if (!parsed) return { ok: false, reason: 'The API key is not in the Gridwright format (gw_…).' };
  const hash = sha256Hex(raw);
  const cache = credentialCacheFor(ctx);
  const apiKey = await cache.read(cache.apiKeys, hash, async () => {
    const row = await ctx.db
      .getRepository(ApiKey)
      .createQueryBuilder('k')
      .addSelect('k.secretHash')
      .where('k.prefix = :prefix', { prefix: parsed.prefix })
      .getOne();
    return row && safeEqual(row.secretHash, hash) ? row : null;
  });
  if (!apiKey) return { ok: false, reason: 'The API key is not known.' };
  if (apiKey.revokedAt) return { ok: false, reason: 'The API key has been revoked.' };
  if (apiKey.expiresAt && apiKey.expiresAt.getTime() <= Date.now()) return { ok: false, reason: 'The API key has expired.' };
  if (!apiKey.lastUsedAt || Date.now() - apiKey.lastUsedAt.getTime() > LAST_USED_RESOLUTION_MS) {
    // Set on the cached row first, so the requests behind this one do not write it again.
    apiKey.lastUsedAt = new Date();
    await ctx.db.getRepository(ApiKey).update({ id: apiKey.id }, { lastUsedAt: apiKey.lastUsedAt });
  }
  return { ok: true, apiKey };
}

export function listApiKeys(ctx: AppContext, tenantId: string, opts: PageQuery & { includeRevoked?: boolean }) {
  const qb = ctx.db.getRepository(ApiKey).createQueryBuilder('k').where('k.tenant_id = :tenantId', { tenantId });
  if (!opts.includeRevoked) qb.andWhere('k.revoked_at IS NULL');
  return pageNewestFirst(qb, opts);
}

export async function getApiKey(ctx: AppContext, tenantId: string, id: string): Promise<ApiKey> {
  const key = isUuid(id) ? await ctx.db.getRepository(ApiKey).findOneBy({ id, tenantId }) : null;
  if (!key) throw notFound(`API key ${id}`);
  return key;
}

export async function revokeApiKey(ctx: AppContext, tenantId: string, id: string, actor: AuditActor): Promise<ApiKey> {
  const revoked = await ctx.db.transaction(async (m) => {
    const key = await getApiKey(ctx, tenantId, id);
    if (key.revokedAt) throw new HttpProblem({ status: 409, slug: 'already-revoked', title: 'Already revoked', detail: `API key ${id} was revoked at ${key.revokedAt.toISOString()}.` });
    await m.update(ApiKey, { id, revokedAt: IsNull() }, { revokedAt: new Date() });
    await recordAudit(m, { tenantId, action: 'key-revoked', actor, target: `${key.name} (gw_${key.prefix})`, details: { apiKeyId: id } });
    return m.findOneByOrFail(ApiKey, { id });
  });
  // Other processes drop the key on the change notice; this one before it answers.
  forgetCredentialChange(ctx, { table: 'api_keys', id });
  return revoked;
}

export const apiKeyView = (k: ApiKey) => ({
  id: k.id,
  name: k.name,
  prefix: `gw_${k.prefix}`,
  scopes: k.scopes,
  expiresAt: k.expiresAt?.toISOString() ?? null,
  revokedAt: k.revokedAt?.toISOString() ?? null,
  lastUsedAt: k.lastUsedAt?.toISOString() ?? null,
  createdAt: k.createdAt.toISOString(),
  createdBy: k.createdBy,
});
