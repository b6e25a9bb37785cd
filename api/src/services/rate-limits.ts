// Request rate limits per credential (API key or signed-in user) and per tenant, counted in
// PostgreSQL (rate-limiter-flexible) so every API process shares the same counters.
import type { Response } from 'express';
import { RateLimiterPostgres, type RateLimiterRes } from 'rate-limiter-flexible';
import type { AppContext } from '../context';
import { HttpProblem } from '../lib/problem';

export const RATE_LIMIT_TABLE = 'rate_limits';

/** The tenant as a whole (all its keys and people together) may use this many times one credential's rate. */
export const TENANT_RATE_FACTOR = 3;

const limiters = new WeakMap<object, Map<string, RateLimiterPostgres>>();

export function postgresLimiter(ctx: AppContext, keyPrefix: string, points: number, durationSeconds: number, clearExpired = false): RateLimiterPostgres {
  let cache = limiters.get(ctx.db);
  if (!cache) limiters.set(ctx.db, (cache = new Map()));
  const id = `${keyPrefix}:${points}:${durationSeconds}`;
  let limiter = cache.get(id);
  if (!limiter) {
    limiter = new RateLimiterPostgres({
      storeClient: (ctx.db.driver as unknown as { master: unknown }).master,
      storeType: 'pool',
      tableName: RATE_LIMIT_TABLE,
      tableCreated: true,
      clearExpiredByTimeout: clearExpired,
      // Points and window are part of the prefix, so a plan change starts a fresh count instead of inheriting one.
      keyPrefix: id,
      points,
      duration: durationSeconds,
    });
    cache.set(id, limiter);
  }
  return limiter;
}

/** A limiter result, or the Error a database failure rejects with. */
export async function consumePoint(limiter: RateLimiterPostgres, key: string): Promise<{ allowed: boolean; res: RateLimiterRes }> {
  try {
    return { allowed: true, res: await limiter.consume(key) };
  } catch (rejection) {
    if (rejection instanceof Error) throw rejection;
    return { allowed: false, res: rejection as RateLimiterRes };
  }
}

interface PolicyState {
  name: string;
  quota: number;
  window: number;
  res: RateLimiterRes;
}

const remaining = (s: PolicyState) => Math.max(0, s.res.remainingPoints);
const resetSeconds = (s: PolicyState) => Math.max(0, Math.ceil(s.res.msBeforeNext / 1000));

/** The RateLimit-Policy and RateLimit fields of draft-ietf-httpapi-ratelimit-headers (structured-field lists). */
function setRateLimitHeaders(res: Response, states: PolicyState[]) {
  res.setHeader('RateLimit-Policy', states.map((s) => `"${s.name}";q=${s.quota};w=${s.window}`).join(', '));
  res.setHeader('RateLimit', states.map((s) => `"${s.name}";r=${remaining(s)};t=${resetSeconds(s)}`).join(', '));
}

export async function enforceRequestRate(
  ctx: AppContext,
  res: Response,
  who: { tenantId: string; credential: string; requestsPerSecond: number },
): Promise<void> {
  const window = ctx.config.rateLimitWindowSeconds;
  // Overrides may be fractional (one request every ten seconds is 0.1); a window always allows one.
  const perCredential = Math.max(1, Math.floor(who.requestsPerSecond * window));
  const perTenant = perCredential * TENANT_RATE_FACTOR;
  const credential = await consumePoint(postgresLimiter(ctx, 'rate-credential', perCredential, window), who.credential);
  const tenant = await consumePoint(postgresLimiter(ctx, 'rate-tenant', perTenant, window), who.tenantId);
  const states: PolicyState[] = [
    { name: 'credential', quota: perCredential, window, res: credential.res },
    { name: 'tenant', quota: perTenant, window, res: tenant.res },
  ];
  setRateLimitHeaders(res, states);
  const refused = states.filter((_, i) => ![credential, tenant][i]!.allowed);
  if (refused.length) {
    const wait = Math.max(1, ...refused.map(resetSeconds));
    throw new HttpProblem({
      status: 429,
      slug: 'rate-limited',
      title: 'Too many requests',
      detail: `Rate limit reached (${refused.map((s) => `${s.name}: ${s.quota} requests per ${s.window} s`).join('; ')}). Retry in ${wait} s.`,
      extensions: { policies: refused.map((s) => s.name) },
      headers: { 'Retry-After': String(wait) },
    });
  }
}
